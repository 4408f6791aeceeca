import type { EntityManager } from '@mikro-orm/postgresql';
import { judgeLoops, type JudgeCause, type VerdictChange } from './judge-loops';
import { enqueueNotifications } from './notify-enqueue';
import { timed, type Timings } from '../jobs/timings';

/** Every loop of a class judged again, in one transaction (batched inside judgeLoops). */
export async function rejudgeClass(em: EntityManager, classId: string, cause: JudgeCause, timings?: Timings): Promise<VerdictChange[]> {
	return em.transactional(async (tx) => {
		const rows = await tx
			.getConnection()
			.execute<{ id: string }[]>('select id from loop where loop_class_id = ?', [classId], 'all', tx.getTransactionContext());
		const changes = await judgeLoops(tx, rows.map((r) => r.id), cause, new Date(), timings);
		await timed(timings, 'enqueue verdict mails', () => enqueueNotifications(tx, changes));
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
 * The scheduled deviation pass (every minute on some worker): a deviation whose start has come
 * begins to count, and one whose expiry has passed stops counting. Each start and each expiry is
 * applied once — the row is marked in the same transaction that judges its loop again — so a
 * pass that runs twice, or on two workers at once, changes nothing the second time.
 */
export async function applyDeviationTimes(em: EntityManager, now = new Date()): Promise<{ started: number; expired: number }> {
	return em.transactional(async (tx) => {
		const conn = tx.getConnection();
		const ctx = tx.getTransactionContext();
		// `for update skip locked` keeps two concurrent passes from applying the same row twice.
		const started = await conn.execute<{ loop_id: string }[]>(
			`update deviation d set start_processed_at = ?
			 where d.id in (select id from deviation where start_processed_at is null and starts_at <= ? for update skip locked)
			 returning d.loop_id`,
			[now, now],
			'all',
			ctx
		);
		const expired = await conn.execute<{ loop_id: string }[]>(
			`update deviation d set expiry_processed_at = ?
			 where d.id in (select id from deviation where expiry_processed_at is null and expires_at <= ? for update skip locked)
			 returning d.loop_id`,
			[now, now],
			'all',
			ctx
		);
		const startedLoops = new Set(started.map((r) => r.loop_id));
		const expiredLoops = [...new Set(expired.map((r) => r.loop_id))];
		// A loop whose deviation both started and lapsed since the last pass is judged once.
		const onlyStarted = [...startedLoops].filter((id) => !expiredLoops.includes(id));
		if (onlyStarted.length) await enqueueNotifications(tx, await judgeLoops(tx, onlyStarted, 'deviation', now));
		if (expiredLoops.length) await enqueueNotifications(tx, await judgeLoops(tx, expiredLoops, 'expiry', now));
		return { started: started.length, expired: expired.length };
	});
}

/** Deviations whose expiry has passed, judged again once (the expiry half of the pass above). */
export async function expireDeviations(em: EntityManager, now = new Date()): Promise<number> {
	return (await applyDeviationTimes(em, now)).expired;
}
