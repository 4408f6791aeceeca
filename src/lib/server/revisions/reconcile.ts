/**
 * The reconcile pass (scheduled): puts right whatever slipped between the store, the database and
 * the queue — objects no revision row points at, presigned uploads whose announcement was lost,
 * revisions whose job was lost, and revisions stuck in `computing` after a crash.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { BOSS_SCHEMA } from '../jobs/boss';
import { QUEUES } from '../jobs/queues';
import { deleteObject, listObjects } from '../storage/s3';
import { MODEL_PREFIX } from './keys';
import { announceObject, PRESIGN_SECONDS } from './upload';
import { enqueueCompute } from './enqueue';

export interface ReconcileReport {
	orphanObjectsDeleted: number;
	announced: number;
	uploadsExpired: number;
	requeued: number;
}

/** An upload stores its object just before its row commits: leave young objects alone. */
const ORPHAN_AGE_MS = 60 * 60 * 1000;
const STUCK_MS = 10 * 60 * 1000;

export async function reconcileStorage(em: EntityManager, now = new Date()): Promise<ReconcileReport> {
	const report: ReconcileReport = { orphanObjectsDeleted: 0, announced: 0, uploadsExpired: 0, requeued: 0 };
	const conn = em.getConnection();

	const objects = await listObjects(MODEL_PREFIX);
	const known = new Set(
		(await conn.execute<{ object_key: string }[]>('select object_key from revision')).map((r) => r.object_key)
	);
	for (const o of objects) {
		if (!known.has(o.key) && now.getTime() - o.modified.getTime() > ORPHAN_AGE_MS) {
			await deleteObject(o.key);
			report.orphanObjectsDeleted++;
		}
	}

	const stored = new Set(objects.map((o) => o.key));
	const waiting = await conn.execute<{ id: string; object_key: string; uploaded_at: Date }[]>(
		`select id, object_key, uploaded_at from revision where state = 'awaiting-upload'`
	);
	for (const w of waiting) {
		if (stored.has(w.object_key)) {
			if ((await announceObject(em, w.object_key)) === 'queued') report.announced++;
		} else if (now.getTime() - new Date(w.uploaded_at).getTime() > (PRESIGN_SECONDS + 300) * 1000) {
			const n = await conn.execute(
				`update revision set state = 'rejected', error_message = ?, error_path = '' where id = ? and state = 'awaiting-upload'`,
				['The file never arrived: the upload link expired before anything was stored.', w.id],
				'run'
			);
			report.uploadsExpired += Number((n as { affectedRows?: number }).affectedRows ?? 0);
		}
	}

	// Queued or stuck revisions without a live job: enqueue again (the job is idempotent).
	const lost = await conn.execute<{ id: string }[]>(
		`select r.id from revision r
		 where (r.state = 'queued' or (r.state = 'computing' and r.uploaded_at < ?))
		   and not exists (select 1 from ${BOSS_SCHEMA}.job j where j.name = ? and j.singleton_key = r.id::text
		                   and j.state in ('created', 'retry', 'active'))`,
		[new Date(now.getTime() - STUCK_MS), QUEUES.computeRevision]
	);
	for (const { id } of lost) {
		await em.transactional(async (tx) => {
			await tx
				.getConnection()
				.execute(`update revision set state = 'queued' where id = ? and state in ('queued', 'computing')`, [id], 'run', tx.getTransactionContext());
			await enqueueCompute(tx, id);
		});
		report.requeued++;
	}
	return report;
}
