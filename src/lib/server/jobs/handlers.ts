import type PgBoss from 'pg-boss';
import { forkEm } from '../db/orm';
import { computeRevision } from '../revisions/compute';
import { reconcileStorage } from '../revisions/reconcile';
import { notifyVerdict } from '../verdicts/notify';
import { expireDeviations, rejudgeClass, rejudgeLoops } from '../verdicts/rejudge';
import { renderReport } from '../reports/render';
import {
	QUEUES,
	SCHEDULES,
	type ComputeRevisionData,
	type NotifyVerdictData,
	type PingData,
	type QueueName,
	type RejudgeClassData,
	type RejudgeLoopsData,
	type RenderReportData
} from './queues';

const COMPUTE_LOOPS = 4;
const COMPUTE_BATCH = 8;

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

/** Register every handler on a started worker boss. */
export async function registerHandlers(boss: PgBoss, options: { origin: string }): Promise<void> {
	await boss.work<PingData>(QUEUES.ping, { pollingIntervalSeconds: 0.5 }, async (jobs) => {
		// The output is stored by pg-boss and read back by whoever sent the ping.
		return jobs.map((job) => ({ nonce: job.data.nonce, pid: process.pid }));
	});
	// Several polling loops per process: pg-boss waits its polling interval (≥ 0.5 s) after every
	// fetch, so one loop would cap both the latency and the rate; a full batch fetches again at once.
	for (let i = 0; i < COMPUTE_LOOPS; i++) {
		let id = '';
		const run = each(boss, QUEUES.computeRevision, async ({ revisionId }: ComputeRevisionData) =>
			computeRevision(await forkEm(), revisionId)
		);
		id = await boss.work<ComputeRevisionData>(QUEUES.computeRevision, { pollingIntervalSeconds: 0.5, batchSize: COMPUTE_BATCH }, async (jobs) => {
			await run(jobs);
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
	await boss.work(QUEUES.expireDeviations, { pollingIntervalSeconds: 5 }, each(boss, QUEUES.expireDeviations, async () => expireDeviations(await forkEm())));
	await boss.work(QUEUES.reconcileStorage, { pollingIntervalSeconds: 5 }, each(boss, QUEUES.reconcileStorage, async () => reconcileStorage(await forkEm())));
	await boss.work<RenderReportData>(
		QUEUES.renderReport,
		{ pollingIntervalSeconds: 1 },
		each(boss, QUEUES.renderReport, async ({ reportId }) => renderReport(await forkEm(), reportId))
	);
	for (const [name, cron] of Object.entries(SCHEDULES)) await boss.schedule(name, cron);
}
