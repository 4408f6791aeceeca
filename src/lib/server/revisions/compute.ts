/**
 * The compute-revision job: download, parse, compute every case, store the report and judge the
 * loop — the final write in one transaction. Idempotent: a revision already computed or rejected
 * is left alone, and the report is unique per revision, so a job retried after a worker was
 * killed midway computes again from scratch and never stores twice.
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ENGINE_VERSION, computeMargins, parseModelText } from '../../margins';
import { getObjectBytes } from '../storage/s3';
import { judgeLoops, type VerdictChange } from '../verdicts/judge-loops';
import { enqueueNotifications } from '../verdicts/notify-enqueue';
import { FAULTS, faultPoint } from '../jobs/faults';

export type ComputeOutcome = 'computed' | 'rejected' | 'skipped';

interface Claimed {
	id: string;
	loop_id: string;
	object_key: string;
	file_name: string;
	sha256: string | null;
}

/** Move the revision to `computing` (its own short transaction, so the UI sees it). */
async function claim(em: EntityManager, revisionId: string): Promise<Claimed | null> {
	const rows = await em.getConnection().execute<Claimed[]>(
		`update revision set state = 'computing', attempts = attempts + 1, job_error = null
		 where id = ? and state in ('queued', 'computing')
		 returning id, loop_id, object_key, file_name, sha256`,
		[revisionId]
	);
	return rows[0] ?? null;
}

function decode(bytes: Uint8Array): string | null {
	try {
		return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		return null;
	}
}

export async function computeRevision(em: EntityManager, revisionId: string): Promise<ComputeOutcome> {
	const rev = await claim(em, revisionId);
	if (!rev) return 'skipped';
	let bytes: Uint8Array;
	try {
		bytes = await getObjectBytes(rev.object_key);
	} catch (error) {
		await em.getConnection().execute('update revision set job_error = ? where id = ?', [
			`Could not read the file from storage: ${error instanceof Error ? error.message : String(error)}`.slice(0, 500),
			rev.id
		]);
		throw error; // pg-boss retries with backoff
	}
	await faultPoint(FAULTS.computeHoldAfterDownload, rev.id);
	const sha256 = createHash('sha256').update(bytes).digest('hex');
	const duplicate = await em.getConnection().execute<{ number: number }[]>(
		'select number from revision where loop_id = ? and sha256 = ? and id <> ? order by number limit 1',
		[rev.loop_id, sha256, rev.id]
	);
	const text = decode(bytes);
	const parsed =
		duplicate.length > 0
			? { ok: false as const, issue: { message: `identical to revision ${duplicate[0].number} of this loop`, path: '' } }
			: text === null
				? { ok: false as const, issue: { message: 'not a text file (the bytes are not UTF-8)', path: '' } }
				: parseModelText(text, rev.file_name);

	return em.transactional(async (tx) => {
		const conn = tx.getConnection();
		const ctx = tx.getTransactionContext();
		let outcome: ComputeOutcome;
		if (!parsed.ok) {
			await conn.execute(
				`update revision set state = 'rejected', sha256 = ?, size_bytes = ?, error_message = ?, error_path = ?, computed_at = now()
				 where id = ? and state = 'computing'`,
				[sha256, bytes.byteLength, parsed.issue.message, parsed.issue.path, rev.id],
				'run',
				ctx
			);
			outcome = 'rejected';
		} else {
			const started = performance.now();
			const result = computeMargins(parsed.model);
			const computeMs = performance.now() - started;
			await conn.execute(
				`insert into margin_report (revision_id, engine_version, result, compute_ms) values (?, ?, ?::jsonb, ?)
				 on conflict (revision_id) do nothing`,
				[rev.id, ENGINE_VERSION, JSON.stringify(result), computeMs],
				'run',
				ctx
			);
			await conn.execute(
				`update revision set state = 'computed', sha256 = ?, size_bytes = ?, computed_at = now() where id = ? and state = 'computing'`,
				[sha256, bytes.byteLength, rev.id],
				'run',
				ctx
			);
			outcome = 'computed';
		}
		const changes: VerdictChange[] = await judgeLoops(tx, [rev.loop_id], 'revision');
		await enqueueNotifications(tx, changes);
		return outcome;
	});
}
