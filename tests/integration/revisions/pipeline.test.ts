/**
 * The revision pipeline on real services: upload → object in the S3 fake → job → a separate
 * worker process computes → verdict stored; refusals keep their message; presigned uploads are
 * announced exactly once however often the event arrives; new targets re-judge the class.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setupRegistry, basicScenario, type Registry } from '../registry/support';
import { startTestWorker, until as waitUntil, type TestWorker } from '../support/worker';
import { ensureBucket } from '../../../src/lib/server/storage/s3';
import {
	announceObject,
	presignRevision,
	uploadRevision
} from '../../../src/lib/server/revisions/upload';
import { getRevision } from '../../../src/lib/server/revisions/queries';
import { setRequirement } from '../../../src/lib/server/registry/requirements';
import { grantDeviation, revokeDeviation } from '../../../src/lib/server/registry/deviations';
import { waitForMessage } from '../support/mail';

let r: Registry;
let worker: TestWorker | undefined;
let scenario: Awaited<ReturnType<typeof basicScenario>>;

// 24/((s+1)(s+2)(s+3)) scaled into the speed band: PM 35.4° (below the 45° target), GM 7.96 dB.
// Crossover-band targets are 20–300 Hz, so frequencies are scaled by 2π·50.
const w = 2 * Math.PI * 50;
const failing = JSON.stringify({
	format: 'headroom-loop-model/1',
	blocks: [{ type: 'factored', zeros: [], poles: [-w, -2 * w, -3 * w], gain: 24 * w ** 3 }]
});
// The same plant with a lower gain: PM well above 45°, GM above 6 dB.
const passing = JSON.stringify({
	format: 'headroom-loop-model/1',
	blocks: [{ type: 'factored', zeros: [], poles: [-w, -2 * w, -3 * w], gain: 8 * w ** 3 }]
});

/** Polls with the worker's output in the failure message. */
const until = <T>(what: string, probe: () => Promise<T | undefined>) =>
	waitUntil(what, probe, 30_000, () => worker?.log() ?? '');

const settled = (id: string) =>
	until(`revision ${id} to settle`, async () => {
		const v = await getRevision(r.em(), id);
		return v.state === 'computed' || v.state === 'rejected' ? v : undefined;
	});

const verdictOf = async (loopId: string) =>
	(
		await r
			.em()
			.getConnection()
			.execute<{ verdict: string }[]>('select verdict from loop where id = ?', [loopId])
	)[0].verdict;

beforeAll(async () => {
	r = await setupRegistry('revisions');
	await ensureBucket();
	scenario = await basicScenario(r);
	worker = await startTestWorker({ DATABASE_URL: r.db.url, ORIGIN: 'http://127.0.0.1:1' });
});

afterAll(async () => {
	await worker?.stop();
	await r?.close();
});

describe('revision pipeline', () => {
	it('computes an upload and judges the loop against its targets', async () => {
		const rev = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, {
			fileName: 'speed.json',
			bytes: new TextEncoder().encode(failing),
			note: 'first identification'
		});
		expect(rev.state).toBe('queued');
		expect(rev.number).toBe(1);
		const done = await settled(rev.id);
		expect(done.state).toBe('computed');
		expect(done.margins?.worstCase.phaseMarginDeg).toBeCloseTo(35.4254, 3);
		expect(await verdictOf(scenario.loop.id)).toBe('noncompliant');
	});

	it('recognises identical content and names the revision it matches', async () => {
		await expect(
			uploadRevision(r.em(), r.users.engineer, scenario.loop.id, {
				fileName: 'again.json',
				bytes: new TextEncoder().encode(failing)
			})
		).rejects.toThrow(/identical to revision 1/);
	});

	it('keeps a refused model with its message and path, and leaves the verdict alone', async () => {
		const bad = JSON.stringify({
			format: 'headroom-loop-model/1',
			blocks: [{ type: 'polynomial', numerator: [1], denominator: [0, 1] }]
		});
		const rev = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, {
			fileName: 'bad.json',
			bytes: new TextEncoder().encode(bad)
		});
		const done = await settled(rev.id);
		expect(done.state).toBe('rejected');
		expect(done.error?.path).toBe('blocks[0].denominator');
		expect(done.error?.message).toMatch(/leading coefficient/i);
		expect(await verdictOf(scenario.loop.id)).toBe('noncompliant');
	});

	it('refuses uploads from an engineer who does not own the loop', async () => {
		await expect(
			uploadRevision(r.em(), r.users.engineer2, scenario.loop.id, {
				bytes: new TextEncoder().encode(passing)
			})
		).rejects.toThrow(/owner/);
	});

	it('announces a presigned upload exactly once, however often the event arrives', async () => {
		const { revision, uploadUrl } = await presignRevision(
			r.em(),
			r.users.engineer,
			scenario.loop.id,
			{ fileName: 'big.json' }
		);
		expect(revision.state).toBe('awaiting-upload');
		const put = await fetch(uploadUrl, { method: 'PUT', body: passing });
		expect(put.ok).toBe(true);
		const outcomes = await Promise.all(
			Array.from({ length: 5 }, () => announceObject(r.em(), revision.objectKey))
		);
		expect(outcomes.filter((o) => o === 'queued')).toHaveLength(1);
		expect(outcomes.filter((o) => o === 'already')).toHaveLength(4);
		const done = await settled(revision.id);
		expect(done.state).toBe('computed');
		expect(await verdictOf(scenario.loop.id)).toBe('compliant');
	});

	it('judges every loop of a class again when its targets change, and mails the owner when it gets worse', async () => {
		await setRequirement(r.em(), r.users.lead, scenario.loopClass.key, {
			minPhaseMarginDeg: '120',
			minUpperGainMarginDb: '6',
			crossoverMinHz: '20',
			crossoverMaxHz: '300',
			reason: 'tighter phase margin for the new encoder'
		});
		await until('the re-judged verdict', async () =>
			(await verdictOf(scenario.loop.id)) === 'noncompliant' ? true : undefined
		);
		const events = await r
			.em()
			.getConnection()
			.execute<{ cause: string; verdict: string }[]>(
				'select cause, verdict from verdict_event where loop_id = ? order by at',
				[scenario.loop.id]
			);
		expect(events.map((e) => e.cause)).toContain('requirement');
		const mail = await waitForMessage({
			to: 'engineer@registry.test',
			subject: /ax1-speed is now noncompliant/,
			where: (m) => /from compliant to noncompliant/.test(m.text ?? '')
		});
		expect(mail.text).toMatch(/Phase margin: required at least 120/);
	});

	it('covers the shortfall while a deviation is active, and judges again when it is revoked', async () => {
		const d = await grantDeviation(r.em(), r.users.lead, scenario.loop.id, {
			criteria: ['phaseMargin'],
			relaxed: { minPhaseMarginDeg: '100' },
			reason: 'encoder upgrade scheduled for the next build',
			expiresAt: new Date(Date.now() + 30 * 86_400_000).toISOString()
		});
		await until('the covered verdict', async () =>
			(await verdictOf(scenario.loop.id)) === 'covered' ? true : undefined
		);
		await revokeDeviation(r.em(), r.users.lead, d.id);
		await until('the verdict after revoking', async () =>
			(await verdictOf(scenario.loop.id)) === 'noncompliant' ? true : undefined
		);
	});
});
