/**
 * A loop's history on real services: three revisions uploaded through the real pipeline (S3 fake,
 * pg-boss, a separate worker process), a target change between them, then the history service,
 * its JSON API and the comparison of two revisions, whose model summaries come from the files in
 * the object store.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setupRegistry, basicScenario, type Registry } from '../registry/support';
import { startTestWorker, until as waitUntil, type TestWorker } from '../support/worker';
import { ensureBucket } from '../../../src/lib/server/storage/s3';
import { uploadRevision } from '../../../src/lib/server/revisions/upload';
import { getRevision } from '../../../src/lib/server/revisions/queries';
import { compareRevisions, loopHistory } from '../../../src/lib/server/revisions/history';
import { setRequirement } from '../../../src/lib/server/registry/requirements';
import { closeOrm } from '../../../src/lib/server/db/orm';
import type { Actor } from '../../../src/lib/server/registry/common';
import * as route from '../../../src/routes/api/loops/[id]/history/+server';
import * as pageRoute from '../../../src/routes/loops/[id]/history/+page.server';

let r: Registry;
let worker: TestWorker | undefined;
let scenario: Awaited<ReturnType<typeof basicScenario>>;
const saved = process.env.DATABASE_URL;

// 8/((s+1)(s+2)(s+3)) and 24/(…) with frequencies scaled by 2π·50 (see pipeline.test.ts):
// the first meets PM ≥ 45°, the second (PM 35.4°) does not.
const w = 2 * Math.PI * 50;
const plant = (gain: number) => ({
	type: 'factored',
	zeros: [],
	poles: [-w, -2 * w, -3 * w],
	gain: gain * w ** 3
});
const first = { format: 'headroom-loop-model/1', title: 'rig identification', blocks: [plant(8)] };
const second = {
	format: 'headroom-loop-model/1',
	title: 'higher gain, PWM delay, hot case',
	delaySeconds: 0.0001,
	blocks: [plant(24)],
	cases: [{ name: 'nominal' }, { name: 'hot', gain: 1.1 }]
};
const broken = {
	format: 'headroom-loop-model/1',
	blocks: [{ type: 'polynomial', numerator: [1], denominator: [0, 1] }]
};

/** Polls with the worker's output in the failure message. */
const until = <T>(what: string, probe: () => Promise<T | undefined>) =>
	waitUntil(what, probe, 30_000, () => worker?.log() ?? '');

async function upload(model: object, fileName: string, note: string) {
	const rev = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, {
		fileName,
		bytes: new TextEncoder().encode(JSON.stringify(model)),
		note
	});
	return until(`revision ${rev.number} to settle`, async () => {
		const v = await getRevision(r.em(), rev.id);
		return v.state === 'computed' || v.state === 'rejected' ? v : undefined;
	});
}

const verdictOf = async (loopId: string) =>
	(
		await r
			.em()
			.getConnection()
			.execute<{ verdict: string }[]>('select verdict from loop where id = ?', [loopId])
	)[0].verdict;

async function call(who: Actor | null, query = '', id = scenario.loop.id, scopes = ['read']) {
	const url = new URL(`http://headroom.test/api/loops/${id}/history${query}`);
	const response = await route.GET({
		url,
		request: new Request(url),
		params: { id },
		locals: { user: who, scopes: who ? scopes : [], requestId: 't' }
	} as never);
	return { status: response.status, body: await response.json() };
}

beforeAll(async () => {
	r = await setupRegistry('history');
	await ensureBucket();
	scenario = await basicScenario(r);
	process.env.DATABASE_URL = r.db.url;
	worker = await startTestWorker({ DATABASE_URL: r.db.url, ORIGIN: 'http://127.0.0.1:1' });

	expect((await upload(first, 'rig.json', 'first identification')).state).toBe('computed');
	await until('the first verdict', async () =>
		(await verdictOf(scenario.loop.id)) === 'compliant' ? true : undefined
	);
	// Tighter targets: revision 1 falls short of them (a verdict change while it is the latest).
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
	expect((await upload(second, 'rig-hot.json', 'gain raised; hot case')).state).toBe('computed');
	expect((await upload(broken, 'broken.json', 'typo')).state).toBe('rejected');
}, 120_000);

afterAll(async () => {
	await worker?.stop();
	await closeOrm();
	process.env.DATABASE_URL = saved;
	await r?.close();
});

describe('loop history', () => {
	it('lists every revision oldest first with state, file, margins and the verdict it got', async () => {
		const h = await loopHistory(r.em(), scenario.loop.id);
		expect(h.loop.key).toBe(scenario.loop.key);
		expect(h.revisions.map((x) => [x.number, x.state, x.fileName, x.note])).toEqual([
			[1, 'computed', 'rig.json', 'first identification'],
			[2, 'computed', 'rig-hot.json', 'gain raised; hot case'],
			[3, 'rejected', 'broken.json', 'typo']
		]);
		const [one, two, three] = h.revisions;
		expect(one.uploadedBy?.name).toBe('Engineer Person');
		expect(one.sha256).toMatch(/^[0-9a-f]{64}$/);
		expect(one.sha256Short).toBe(one.sha256!.slice(0, 12));
		expect(one.sizeBytes).toBe(JSON.stringify(first).length);
		expect(one.computedAt).not.toBeNull();
		expect(one.worstCase?.stable).toBe(true);
		expect(one.worstCase!.phaseMarginDeg!).toBeGreaterThan(45);
		expect(two.worstCase!.phaseMarginDeg!).toBeLessThan(one.worstCase!.phaseMarginDeg!);
		expect(two.caseNames).toEqual(['nominal', 'hot']);

		// Revision 1: judged compliant against v1, then non-compliant when v2 came into force.
		expect(one.verdict).toMatchObject({
			verdict: 'compliant',
			changed: true,
			requirementVersion: 1,
			cause: 'revision'
		});
		expect(one.requirementVersion).toBe(1);
		expect(one.laterVerdicts).toMatchObject([
			{ verdict: 'noncompliant', cause: 'requirement', requirementVersion: 2 }
		]);
		// Revision 2 kept the verdict the loop already had: no event of its own.
		expect(two.verdict).toMatchObject({ verdict: 'noncompliant', changed: false });
		expect(two.requirementVersion).toBe(2);
		// A refused model keeps its message and path, and was never judged.
		expect(three.error).toEqual({
			message: expect.stringMatching(/leading coefficient/i),
			path: 'blocks[0].denominator'
		});
		expect(three.verdict).toBeNull();
		expect(three.worstCase).toBeNull();
	});

	it('gives every requirement version of the class with when it was in force', async () => {
		const h = await loopHistory(r.em(), scenario.loop.id);
		expect(h.requirements.map((q) => [q.version, q.targets.minPhaseMarginDeg])).toEqual([
			[1, '45'],
			[2, '120']
		]);
		expect(h.requirements[0].inForceUntil).toBe(h.requirements[1].inForceFrom);
		expect(h.requirements[1].inForceUntil).toBeNull();
		expect(Date.parse(h.requirements[1].inForceFrom)).toBeLessThan(
			Date.parse(h.revisions[1].uploadedAt)
		);
	});

	it('compares two revisions: margin sentences and the model summaries read from storage', async () => {
		const c = await compareRevisions(r.em(), scenario.loop.id, 1, 2);
		const texts = c.diff.sentences.map((s) => s.text);
		const pm = c.diff.worstCase.find((f) => f.key === 'phaseMarginDeg')!;
		expect(pm.tone).toBe('worse');
		expect(texts).toContain(
			`Phase margin fell ${Math.abs(pm.delta!).toFixed(1)}° since revision 1 (${pm.beforeText} → ${pm.afterText}).`
		);
		expect(texts).toContain('Operating case “hot” added since revision 1.');
		expect(texts).toContain('Model: loop delay changed from none to 100 µs since revision 1.');
		expect(c.a.summary?.cases).toEqual(['nominal']);
		expect(c.b.summary?.cases).toEqual(['nominal', 'hot']);
		expect(c.b.summary?.order).toBe(3);
		const delay = c.diff.model.find((m) => m.field === 'delay')!;
		expect(delay).toMatchObject({ before: 'none', after: '100 µs', changed: true });
		expect(c.diff.model.find((m) => m.field === 'block1')?.changed).toBe(true);
	});

	it('explains a comparison with a rejected revision instead of inventing margins', async () => {
		const c = await compareRevisions(r.em(), scenario.loop.id, 2, 3);
		expect(c.diff.worstCase).toEqual([]);
		expect(c.diff.notes[0]).toMatch(
			/^Revision 3 was rejected \(.*leading coefficient.* at blocks\[0\]\.denominator\)/i
		);
		expect(c.b.summary).toBeNull();
		expect(c.b.summaryProblem).toMatch(/refused/);
	});

	it('serves the history and a comparison as JSON to any reader', async () => {
		const plain = await call(r.users.viewer);
		expect(plain.status).toBe(200);
		expect(plain.body.revisions).toHaveLength(3);
		expect(plain.body.requirements).toHaveLength(2);
		expect(plain.body.comparison).toBeNull();
		const compared = await call(r.users.viewer, '?a=1&b=2');
		expect(compared.status).toBe(200);
		expect(compared.body.comparison.diff.sentences[0].text).toMatch(/since revision 1/);
	});

	it('answers bad requests with the error body, naming the parameter', async () => {
		expect(await call(null)).toMatchObject({
			status: 401,
			body: { error: { code: 'unauthenticated' } }
		});
		expect(await call(r.users.viewer, '', scenario.loop.id, [])).toMatchObject({ status: 403 });
		expect(await call(r.users.viewer, '?a=1')).toMatchObject({
			status: 400,
			body: { error: { code: 'invalid', path: 'b' } }
		});
		expect(await call(r.users.viewer, '?a=x&b=2')).toMatchObject({
			status: 400,
			body: { error: { path: 'a' } }
		});
		expect(await call(r.users.viewer, '?a=2&b=2')).toMatchObject({
			status: 400,
			body: { error: { path: 'b' } }
		});
		expect(await call(r.users.viewer, '?a=1&b=9')).toMatchObject({
			status: 404,
			body: { error: { message: 'This loop has no revision 9 (b).' } }
		});
		expect(await call(r.users.viewer, '', '00000000-0000-4000-8000-000000000000')).toMatchObject({
			status: 404
		});
		expect(await call(r.users.viewer, '', 'not-a-uuid')).toMatchObject({ status: 404 });
	});

	it('loads the page with the two latest computed revisions compared, or says what is wrong with the choice', async () => {
		const load = async (query: string) => {
			const url = new URL(`http://headroom.test/loops/${scenario.loop.id}/history${query}`);
			const event = {
				url,
				request: new Request(url),
				params: { id: scenario.loop.id },
				locals: { user: r.users.viewer, scopes: ['read'], requestId: 't' }
			};
			return (await pageRoute.load(event as never)) as Exclude<
				Awaited<ReturnType<typeof pageRoute.load>>,
				void
			>;
		};
		const plain = await load('');
		expect(plain.selected).toEqual({ a: 1, b: 2 });
		expect(plain.comparison?.diff.before).toBe(1);
		// Reversed in the URL: still told as "since" the older one.
		expect((await load('?a=2&b=1')).comparison?.diff.sentences[0].text).toMatch(/since revision 1/);
		expect((await load('?a=1&b=7')).problem).toBe(
			'This loop has no revision 7; pick one from the lists.'
		);
		expect((await load('?a=2&b=2')).problem).toBe('Pick two different revisions to compare.');
		const anonymous = new URL(`http://headroom.test/loops/${scenario.loop.id}/history`);
		await expect(
			pageRoute.load({
				url: anonymous,
				request: new Request(anonymous),
				params: { id: scenario.loop.id },
				locals: { user: null, scopes: [] }
			} as never)
		).rejects.toMatchObject({ status: 303, location: expect.stringMatching(/^\/signin\?next=/) });
	});
});
