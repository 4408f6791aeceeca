/**
 * A worker killed in the middle of a compute job (SIGKILL: no handler runs) leaves the revision to
 * be computed again by another worker: the job is retried once pg-boss takes it for lost, the
 * revision ends `computed`, exactly one margin report exists and the verdict is the right one.
 * The hold comes from a test-only fault point (HEADROOM_TEST_FAULTS); the short job expiry and
 * maintenance interval from the workers' environment, so the retry comes in seconds.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setupRegistry, basicScenario, type Registry } from '../registry/support';
import { ensureBucket } from '../../../src/lib/server/storage/s3';
import { uploadRevision } from '../../../src/lib/server/revisions/upload';
import { QUEUES } from '../../../src/lib/server/jobs/queues';
import { FAULTS } from '../../../src/lib/server/jobs/faults';
import { startTestWorker, until, type TestWorker } from '../support/worker';

let r: Registry;
let scenario: Awaited<ReturnType<typeof basicScenario>>;
const workers: TestWorker[] = [];

// PM 35.4° against the class's 45° target (the same plant as pipeline.test.ts): noncompliant.
const w = 2 * Math.PI * 50;
const failing = JSON.stringify({
	format: 'headroom-loop-model/1',
	blocks: [{ type: 'factored', zeros: [], poles: [-w, -2 * w, -3 * w], gain: 24 * w ** 3 }]
});

const one = async <T>(sql: string, params: unknown[]) => (await r.em().getConnection().execute<T[]>(sql, params))[0];

beforeAll(async () => {
	r = await setupRegistry('worker-kill');
	await ensureBucket();
	scenario = await basicScenario(r);
});

afterAll(async () => {
	for (const worker of workers) await worker.stop();
	await r?.close();
});

describe('a worker killed mid-job', () => {
	it('leaves the revision to another worker: retried, computed once, judged right', async () => {
		const fast = { DATABASE_URL: r.db.url, HEADROOM_COMPUTE_EXPIRE_SECONDS: '3', HEADROOM_JOB_MAINTENANCE_SECONDS: '1' };
		const first = await startTestWorker({ ...fast, HEADROOM_TEST_FAULTS: FAULTS.computeHoldAfterDownload });
		workers.push(first);
		const rev = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, {
			fileName: 'speed.json',
			bytes: new TextEncoder().encode(failing)
		});
		await first.waitForOutput(`[fault] ${FAULTS.computeHoldAfterDownload} ${rev.id}`);
		// Mid-job: claimed and downloaded, nothing written yet.
		expect((await one<{ state: string }>('select state from revision where id = ?', [rev.id])).state).toBe('computing');
		await first.kill();
		expect(first.child.signalCode).toBe('SIGKILL');
		const job = () =>
			one<{ state: string; retry_count: number }>('select state, retry_count from pgboss.job where name = ? and singleton_key = ?', [
				QUEUES.computeRevision,
				rev.id
			]);
		expect((await job()).state).toBe('active');
		expect((await one<{ n: number }>('select count(*)::int as n from margin_report where revision_id = ?', [rev.id])).n).toBe(0);

		const second = await startTestWorker(fast);
		workers.push(second);
		const done = await until(
			'the retried job to complete',
			async () => ((await job()).state === 'completed' ? true : undefined),
			180_000,
			() => second.log()
		);
		expect(done).toBe(true);
		expect((await job()).retry_count).toBeGreaterThanOrEqual(1);
		const revision = await one<{ state: string; attempts: number }>('select state, attempts from revision where id = ?', [rev.id]);
		expect(revision.state).toBe('computed');
		expect(revision.attempts).toBeGreaterThanOrEqual(2);
		expect((await one<{ n: number }>('select count(*)::int as n from margin_report where revision_id = ?', [rev.id])).n).toBe(1);
		const loop = await one<{ verdict: string; judged_revision_id: string }>('select verdict, judged_revision_id from loop where id = ?', [scenario.loop.id]);
		expect(loop).toEqual({ verdict: 'noncompliant', judged_revision_id: rev.id });
		const events = await r
			.em()
			.getConnection()
			.execute<{ verdict: string }[]>('select verdict from verdict_event where loop_id = ? order by at', [scenario.loop.id]);
		// One judgement of the computed revision. Before it, the class's re-judge job (queued when
		// the scenario created the class) may have run while the revision was still in flight, on
		// a loaded machine, and recorded the loop as `pending`; nothing else may appear.
		expect(events.map((e) => e.verdict).filter((v) => v !== 'pending')).toEqual(['noncompliant']);
		expect(events.length).toBeLessThanOrEqual(2);
	});
});
