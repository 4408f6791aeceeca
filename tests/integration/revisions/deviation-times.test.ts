/**
 * The scheduled deviation pass run directly (no worker): a deviation granted to start in the
 * future changes nothing until its start, then covers the shortfall; when it lapses the loop is
 * noncompliant again. Each start and expiry is applied once, however often the pass runs.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setupRegistry, basicScenario, type Registry } from '../registry/support';
import { ensureBucket } from '../../../src/lib/server/storage/s3';
import { uploadRevision } from '../../../src/lib/server/revisions/upload';
import { computeRevision } from '../../../src/lib/server/revisions/compute';
import { grantDeviation, revokeDeviation } from '../../../src/lib/server/registry/deviations';
import { applyDeviationTimes, rejudgeLoops } from '../../../src/lib/server/verdicts/rejudge';
import { QUEUES } from '../../../src/lib/server/jobs/queues';

let r: Registry;
let scenario: Awaited<ReturnType<typeof basicScenario>>;
const DAY = 86_400_000;
const t0 = Date.now();
const at = (days: number) => new Date(t0 + days * DAY);

// PM 35.4° against the class's 45° target.
const w = 2 * Math.PI * 50;
const failing = JSON.stringify({
	format: 'headroom-loop-model/1',
	blocks: [{ type: 'factored', zeros: [], poles: [-w, -2 * w, -3 * w], gain: 24 * w ** 3 }]
});

const verdict = async () =>
	(await r.em().getConnection().execute<{ verdict: string }[]>('select verdict from loop where id = ?', [scenario.loop.id]))[0].verdict;
const events = async () =>
	r.em().getConnection().execute<{ verdict: string; cause: string; id: string }[]>(
		'select id, verdict, cause from verdict_event where loop_id = ? order by at, verdict',
		[scenario.loop.id]
	);
const notifyJobs = async (eventId: string) =>
	(
		await r.em().getConnection().execute<{ n: number }[]>('select count(*)::int as n from pgboss.job where name = ? and singleton_key = ?', [
			QUEUES.notifyVerdict,
			eventId
		])
	)[0].n;

beforeAll(async () => {
	r = await setupRegistry('deviation-times');
	await ensureBucket();
	scenario = await basicScenario(r);
	const rev = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, { bytes: new TextEncoder().encode(failing) });
	expect(await computeRevision(r.em(), rev.id)).toBe('computed');
});
afterAll(async () => r?.close());

describe('deviations that start in the future', () => {
	it('count from their start, once, and stop at their expiry, once', async () => {
		expect(await verdict()).toBe('noncompliant');
		await grantDeviation(r.em(), r.users.lead, scenario.loop.id, {
			criteria: ['phaseMargin'],
			relaxed: { minPhaseMarginDeg: '30' },
			reason: 'new encoder arrives next week',
			startsAt: at(1).toISOString(),
			expiresAt: at(3).toISOString()
		});
		// What the grant's re-judge job does: the deviation is not in force yet.
		await rejudgeLoops(r.em(), [scenario.loop.id], 'deviation');
		expect(await verdict()).toBe('noncompliant');
		expect(await applyDeviationTimes(r.em(), at(0.5))).toEqual({ started: 0, expired: 0 });
		expect(await verdict()).toBe('noncompliant');

		expect(await applyDeviationTimes(r.em(), at(1.5))).toEqual({ started: 1, expired: 0 });
		expect(await verdict()).toBe('covered');
		expect((await events()).map((e) => `${e.cause}:${e.verdict}`)).toEqual(['revision:noncompliant', 'deviation:covered']);
		// A second pass (or another worker's) applies nothing again.
		expect(await applyDeviationTimes(r.em(), at(1.6))).toEqual({ started: 0, expired: 0 });
		expect(await events()).toHaveLength(2);

		expect(await applyDeviationTimes(r.em(), at(3.5))).toEqual({ started: 0, expired: 1 });
		expect(await verdict()).toBe('noncompliant');
		const all = await events();
		expect(all.map((e) => `${e.cause}:${e.verdict}`)).toEqual(['revision:noncompliant', 'deviation:covered', 'expiry:noncompliant']);
		// Worse again: the verdict mail is queued with the change.
		expect(await notifyJobs(all[2].id)).toBe(1);
		expect(await applyDeviationTimes(r.em(), at(4))).toEqual({ started: 0, expired: 0 });
	});

	it('a deviation revoked before its start never covers anything', async () => {
		const d = await grantDeviation(r.em(), r.users.lead, scenario.loop.id, {
			criteria: ['phaseMargin'],
			relaxed: { minPhaseMarginDeg: '30' },
			reason: 'planned, then cancelled',
			startsAt: at(10).toISOString(),
			expiresAt: at(12).toISOString()
		});
		await revokeDeviation(r.em(), r.users.lead, d.id);
		const before = (await events()).length;
		expect((await applyDeviationTimes(r.em(), at(10.5))).started).toBe(1);
		expect(await verdict()).toBe('noncompliant');
		expect(await events()).toHaveLength(before);
	});
});
