/**
 * The compute-revision job: download, parse, compute every case, store the report and judge the
 * loop — the final write in one transaction. Workers take jobs in batches: a batch is claimed
 * with one statement, its files are downloaded concurrently, and its reports, revision states and
 * verdicts are written in one transaction (a few statements for the whole batch). Idempotent per
 * revision: one already computed or rejected is left alone, and the report is unique per
 * revision, so a job retried after a worker was killed midway computes again from scratch and
 * never stores twice; nothing is half-written, because nothing is written before the commit.
 * When the batch's transaction fails, each revision is written again on its own, so one bad
 * revision cannot hold back the others.
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ENGINE_VERSION, computeMargins, parseModelText } from '../../margins';
import type { MarginsResult } from '../../margins/types';
import { getObjectBytes } from '../storage/s3';
import { judgeLoops } from '../verdicts/judge-loops';
import { enqueueNotifications } from '../verdicts/notify-enqueue';
import { FAULTS, faultPoint } from '../jobs/faults';
import { timed, type Timings } from '../jobs/timings';

export type ComputeOutcome = 'computed' | 'rejected' | 'skipped';

interface Claimed {
	id: string;
	loop_id: string;
	number: number;
	object_key: string;
	file_name: string;
}

type Prepared = Claimed & { sha256: string; size: number } & (
		| { ok: true; result: MarginsResult; computeMs: number }
		| { ok: false; message: string; path: string }
	);

const list = (n: number) => Array.from({ length: n }, () => '?').join(', ');
const describe = (error: unknown) => (error instanceof Error ? error.message : String(error));

/** Move the revisions to `computing` (one short statement of its own, so the UI sees it). */
async function claim(em: EntityManager, ids: string[]): Promise<Claimed[]> {
	return em.getConnection().execute<Claimed[]>(
		`update revision set state = 'computing', attempts = attempts + 1, job_error = null
		 where id in (${list(ids.length)}) and state in ('queued', 'computing')
		 returning id, loop_id, number, object_key, file_name`,
		ids
	);
}

function decode(bytes: Uint8Array): string | null {
	try {
		return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		return null;
	}
}

/**
 * Content identical to another revision of the same loop is refused, naming the lowest such
 * revision number — whether that one is stored already or sits in the same batch.
 */
async function duplicatesOf(em: EntityManager, files: (Claimed & { sha256: string })[]): Promise<Map<string, number>> {
	const rows = await em.getConnection().execute<{ id: string; loop_id: string; sha256: string; number: number }[]>(
		`select id, loop_id, sha256, number from revision where loop_id in (${list(files.length)}) and sha256 in (${list(files.length)})`,
		[...files.map((f) => f.loop_id), ...files.map((f) => f.sha256)]
	);
	const inBatch = new Set(files.map((f) => f.id));
	const stored = rows.filter((r) => !inBatch.has(r.id));
	const found = new Map<string, number>();
	for (const f of files) {
		const same = (o: { loop_id: string; sha256: string }) => o.loop_id === f.loop_id && o.sha256 === f.sha256;
		// Any stored one counts; within the batch only a lower-numbered file is the original.
		const numbers = [...stored.filter(same), ...files.filter((o) => same(o) && o.number < f.number)].map((o) => o.number);
		if (numbers.length) found.set(f.id, Math.min(...numbers));
	}
	return found;
}

/** Parse and compute (CPU only); a model the parser refuses becomes a rejection with its path. */
function prepare(file: Claimed & { sha256: string; bytes: Uint8Array }, duplicate: number | undefined): Prepared {
	const base = { ...file, size: file.bytes.byteLength, bytes: undefined };
	if (duplicate !== undefined) return { ...base, ok: false, message: `identical to revision ${duplicate} of this loop`, path: '' };
	const text = decode(file.bytes);
	if (text === null) return { ...base, ok: false, message: 'not a text file (the bytes are not UTF-8)', path: '' };
	const parsed = parseModelText(text, file.file_name);
	if (!parsed.ok) return { ...base, ok: false, message: parsed.issue.message, path: parsed.issue.path };
	const started = performance.now();
	const result = computeMargins(parsed.model);
	return { ...base, ok: true, result, computeMs: performance.now() - started };
}

/** Reports, states and verdicts of prepared revisions, in one transaction. */
async function write(em: EntityManager, prepared: Prepared[], timings?: Timings): Promise<void> {
	await timed(timings, 'write transaction', () => em.transactional(async (tx) => {
		const conn = tx.getConnection();
		const ctx = tx.getTransactionContext();
		const computed = prepared.filter((p): p is Extract<Prepared, { ok: true }> => p.ok);
		const rejected = prepared.filter((p): p is Extract<Prepared, { ok: false }> => !p.ok);
		if (computed.length) {
			await conn.execute(
				`insert into margin_report (revision_id, engine_version, result, compute_ms)
				 values ${computed.map(() => '(?::uuid, ?, ?::jsonb, ?::float8)').join(', ')}
				 on conflict (revision_id) do nothing`,
				computed.flatMap((c) => [c.id, ENGINE_VERSION, JSON.stringify(c.result), c.computeMs]),
				'run',
				ctx
			);
			await conn.execute(
				`update revision r set state = 'computed', sha256 = v.sha256, size_bytes = v.size, computed_at = now()
				 from (values ${computed.map(() => '(?::uuid, ?, ?::int)').join(', ')}) as v(id, sha256, size)
				 where r.id = v.id and r.state = 'computing'`,
				computed.flatMap((c) => [c.id, c.sha256, c.size]),
				'run',
				ctx
			);
		}
		if (rejected.length) {
			await conn.execute(
				`update revision r set state = 'rejected', sha256 = v.sha256, size_bytes = v.size, error_message = v.message,
				        error_path = v.path, computed_at = now()
				 from (values ${rejected.map(() => '(?::uuid, ?, ?::int, ?, ?)').join(', ')}) as v(id, sha256, size, message, path)
				 where r.id = v.id and r.state = 'computing'`,
				rejected.flatMap((p) => [p.id, p.sha256, p.size, p.message, p.path]),
				'run',
				ctx
			);
		}
		// Sorted, so concurrent batches touching the same loops lock them in the same order.
		const changes = await timed(timings, 'judge (inside the write)', () => judgeLoops(tx, [...new Set(prepared.map((p) => p.loop_id))].sort(), 'revision'));
		await enqueueNotifications(tx, changes);
	}));
}

/**
 * Compute a batch of revisions. Answers, per revision id, its outcome or the error that must
 * fail its job (pg-boss retries it with backoff); revisions not in a state to compute are skipped.
 */
export async function computeRevisions(
	em: EntityManager,
	revisionIds: string[],
	timings?: Timings
): Promise<Map<string, ComputeOutcome | Error>> {
	const outcomes = new Map<string, ComputeOutcome | Error>(revisionIds.map((id) => [id, 'skipped']));
	const ids = [...new Set(revisionIds)];
	if (!ids.length) return outcomes;
	const claimed = await timed(timings, 'claim', () => claim(em, ids));
	if (!claimed.length) return outcomes;

	const downloaded = await timed(timings, 'S3 get (concurrent)', () => Promise.all(
		claimed.map(async (rev) => {
			try {
				const bytes = await getObjectBytes(rev.object_key);
				return { ...rev, bytes, sha256: createHash('sha256').update(bytes).digest('hex') };
			} catch (error) {
				const message = `Could not read the file from storage: ${describe(error)}`.slice(0, 500);
				await em.getConnection().execute('update revision set job_error = ? where id = ?', [message, rev.id]);
				outcomes.set(rev.id, error instanceof Error ? error : new Error(message));
				return null;
			}
		})
	));
	const files = downloaded.filter((f) => f !== null);
	if (!files.length) return outcomes;
	await faultPoint(FAULTS.computeHoldAfterDownload, files.map((f) => f.id).join(' '));

	const duplicates = await timed(timings, 'duplicate check', () => duplicatesOf(em, files));
	const prepared = await timed(timings, 'parse + engine', () => files.map((f) => prepare(f, duplicates.get(f.id))));
	try {
		await write(em, prepared, timings);
		for (const p of prepared) outcomes.set(p.id, p.ok ? 'computed' : 'rejected');
	} catch (batchError) {
		if (prepared.length === 1) {
			outcomes.set(prepared[0].id, batchError instanceof Error ? batchError : new Error(describe(batchError)));
			return outcomes;
		}
		// One at a time, so only the revision at fault fails (and is retried).
		for (const p of prepared) {
			try {
				await write(em, [p]);
				outcomes.set(p.id, p.ok ? 'computed' : 'rejected');
			} catch (error) {
				outcomes.set(p.id, error instanceof Error ? error : new Error(describe(error)));
			}
		}
	}
	return outcomes;
}

/** One revision (reconcile, scripts, tests): the batch path with a batch of one. */
export async function computeRevision(em: EntityManager, revisionId: string): Promise<ComputeOutcome> {
	const outcome = (await computeRevisions(em, [revisionId])).get(revisionId)!;
	if (outcome instanceof Error) throw outcome;
	return outcome;
}
