import type { EntityManager } from '@mikro-orm/postgresql';
import { judgeLoops, type JudgeCause, type VerdictChange } from './judge-loops';
import { enqueueNotifications } from './notify-enqueue';

/** Every loop of a class judged again, in one transaction (batched inside judgeLoops). */
export async function rejudgeClass(em: EntityManager, classId: string, cause: JudgeCause): Promise<VerdictChange[]> {
	return em.transactional(async (tx) => {
		const rows = await tx
			.getConnection()
			.execute<{ id: string }[]>('select id from loop where loop_class_id = ?', [classId], 'all', tx.getTransactionContext());
		const changes = await judgeLoops(tx, rows.map((r) => r.id), cause);
		await enqueueNotifications(tx, changes);
		return changes;
	});
}

export async function rejudgeLoops(em: EntityManager, loopIds: string[], cause: JudgeCause): Promise<VerdictChange[]> {
	return em.transactional(async (tx) => {
		const changes = await judgeLoops(tx, loopIds, cause);
		await enqueueNotifications(tx, changes);
		return changes;
	});
}

/**
 * Deviations whose expiry has passed stop counting: their loops are judged again once, and the
 * deviation is marked so the next run does not redo it. Runs every minute on some worker.
 */
export async function expireDeviations(em: EntityManager, now = new Date()): Promise<number> {
	return em.transactional(async (tx) => {
		const ctx = tx.getTransactionContext();
		const rows = await tx.getConnection().execute<{ loop_id: string }[]>(
			`update deviation set expiry_processed_at = ? where expiry_processed_at is null and expires_at <= ?
			 returning loop_id`,
			[now, now],
			'all',
			ctx
		);
		const loops = [...new Set(rows.map((r) => r.loop_id))];
		if (loops.length) await enqueueNotifications(tx, await judgeLoops(tx, loops, 'expiry', now));
		return rows.length;
	});
}
