import type PgBoss from 'pg-boss';
import { forkEm } from '../db/orm';
import { computeRevisions, type ComputeOutcome } from '../revisions/compute';
import { reconcileStorage } from '../revisions/reconcile';
import { notifyVerdict } from '../verdicts/notify';
import { applyDeviationTimes, rejudgeClass, rejudgeLoops } from '../verdicts/rejudge';
import { renderReport } from '../reports/render';
import {
	QUEUES,
	schedules,
	type ComputeRevisionData,
	type NotifyVerdictData,
	type PingData,
	type QueueName,
	type RejudgeClassData,
	type RejudgeLoopsData,
	type RenderReportData,
	type SendDigestData
} from './queues';
import { openDigests, sendDigest } from '../verdicts/digest';

const COMPUTE_LOOPS = 3;
const COMPUTE_BATCH = 25;

const describe = (error: unknown) => (error instanceof Error ? error.message : String(error)).slice(0, 500);

/**
 * Run each job of a fetched batch on its own EntityManager; a failing job is failed alone (and
 * retried by pg-boss with backoff) instead of failing the jobs that happened to share its batch.
 */
function each<T extends object>(boss: PgBoss, name: QueueName, run: (data: T, job: PgBoss.Job<T>) => Promise<unknown>) {
	return async (jobs: PgBoss.Job<T>[]) => {
		for (const job of jobs) {
			try {
				const output = await run(job.data, job);
				await boss.complete(name, job.id, { output });
			} catch (error) {
				console.error(`[jobs] ${name} ${job.id} failed:`, describe(error));
				await boss.fail(name, job.id, { message: describe(error) });
			}
		}
	};
}

/** pg-boss 10 completes and fails many jobs with one output (its types only list the single-id form). */
type Settle = (name: string, ids: string[], data: object) => Promise<void>;
const settleMany = (boss: PgBoss, how: 'complete' | 'fail', name: string, ids: string[], data: object) =>
	(boss[how] as unknown as Settle).call(boss, name, ids, data);

async function computeBatch(boss: PgBoss, jobs: PgBoss.Job<ComputeRevisionData>[]) {
	const name = QUEUES.computeRevision;
	let outcomes: Map<string, ComputeOutcome | Error>;
	try {
		outcomes = await computeRevisions(await forkEm(), jobs.map((j) => j.data.revisionId));
	} catch (error) {
		console.error(`[jobs] ${name} batch of ${jobs.length} failed:`, describe(error));
		await settleMany(boss, 'fail', name, jobs.map((j) => j.id), { message: describe(error) });
		return;
	}
	const done = new Map<ComputeOutcome, string[]>();
	for (const job of jobs) {
		const outcome = outcomes.get(job.data.revisionId) ?? 'skipped';
		if (outcome instanceof Error) {
			console.error(`[jobs] ${name} ${job.id} failed:`, describe(outcome));
			await boss.fail(name, job.id, { message: describe(outcome) });
		} else done.set(outcome, [...(done.get(outcome) ?? []), job.id]);
	}
	for (const [output, ids] of done) await settleMany(boss, 'complete', name, ids, { output });
}

/** Register every handler on a started worker boss. */
export async function registerHandlers(boss: PgBoss, options: { origin: string }): Promise<void> {
	await boss.work<PingData>(QUEUES.ping, { pollingIntervalSeconds: 0.5 }, async (jobs) => {
		// The output is stored by pg-boss and read back by whoever sent the ping.
		return jobs.map((job) => ({ nonce: job.data.nonce, pid: process.pid }));
	});
	// Several polling loops per process: pg-boss waits its polling interval (≥ 0.5 s) after every
	// fetch, so one loop would cap both the latency and the rate; a full batch fetches again at once.
	// A fetched batch is computed together (computeRevisions: one claim, concurrent downloads, one
	// write transaction) and its jobs completed together; a revision that failed fails its job alone.
	for (let i = 0; i < COMPUTE_LOOPS; i++) {
		let id = '';
		id = await boss.work<ComputeRevisionData>(QUEUES.computeRevision, { pollingIntervalSeconds: 0.5, batchSize: COMPUTE_BATCH }, async (jobs) => {
			await computeBatch(boss, jobs);
			if (jobs.length === COMPUTE_BATCH) boss.notifyWorker(id);
		});
		// Stagger the loops so their polls spread over the interval.
		await new Promise((r) => setTimeout(r, 500 / COMPUTE_LOOPS));
	}
	await boss.work<RejudgeClassData>(
		QUEUES.rejudgeClass,
		{ pollingIntervalSeconds: 1 },
		each(boss, QUEUES.rejudgeClass, async ({ classId, cause }) => (await rejudgeClass(await forkEm(), classId, cause)).length)
	);
	await boss.work<RejudgeLoopsData>(
		QUEUES.rejudgeLoops,
		{ pollingIntervalSeconds: 1 },
		each(boss, QUEUES.rejudgeLoops, async ({ loopIds, cause }) => (await rejudgeLoops(await forkEm(), loopIds, cause)).length)
	);
	await boss.work<NotifyVerdictData>(
		QUEUES.notifyVerdict,
		{ pollingIntervalSeconds: 2 },
		each(boss, QUEUES.notifyVerdict, async ({ eventId }) => notifyVerdict(await forkEm(), eventId, options.origin))
	);
	await boss.work(QUEUES.expireDeviations, { pollingIntervalSeconds: 5 }, each(boss, QUEUES.expireDeviations, async () => applyDeviationTimes(await forkEm())));
	await boss.work(QUEUES.reconcileStorage, { pollingIntervalSeconds: 5 }, each(boss, QUEUES.reconcileStorage, async () => reconcileStorage(await forkEm())));
	await boss.work<RenderReportData>(
		QUEUES.renderReport,
		{ pollingIntervalSeconds: 1 },
		each(boss, QUEUES.renderReport, async ({ reportId }) => renderReport(await forkEm(), reportId))
	);
	await boss.work(QUEUES.openDigests, { pollingIntervalSeconds: 5 }, each(boss, QUEUES.openDigests, async () => openDigests(await forkEm())));
	await boss.work<SendDigestData>(
		QUEUES.sendDigest,
		{ pollingIntervalSeconds: 2 },
		each(boss, QUEUES.sendDigest, async ({ digestId }) => sendDigest(await forkEm(), digestId, options.origin))
	);
	for (const [name, cron] of Object.entries(schedules())) await boss.schedule(name, cron);
}
