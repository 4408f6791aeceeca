/**
 * GET /api/loops, /api/loops/summary and /api/loops/export.csv through their real handlers on a
 * small judged registry: every filter, every sort, paging, bad parameters and the CSV file.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dashboardScenario } from './support';
import type { Registry } from '../registry/support';
import { closeOrm } from '../../../src/lib/server/db/orm';
import { parseCsv } from '../../../src/lib/registry/csv';
import { EXPORT_COLUMNS } from '../../../src/lib/server/registry/loop-export';
import { LOOP_SORTS } from '../../../src/lib/server/registry/loop-query';
import type { LoopListItem } from '../../../src/lib/server/registry/loops';
import * as list from '../../../src/routes/api/loops/+server';
import * as summary from '../../../src/routes/api/loops/summary/+server';
import * as exportCsv from '../../../src/routes/api/loops/export.csv/+server';

let r: Registry;
let loops: Awaited<ReturnType<typeof dashboardScenario>>['loops'];
const saved = process.env.DATABASE_URL;
beforeAll(async () => {
	({ r, loops } = await dashboardScenario('dash_api'));
	process.env.DATABASE_URL = r.db.url;
});
afterAll(async () => {
	await closeOrm();
	process.env.DATABASE_URL = saved;
	await r?.close();
});

type Handler = (event: never) => Promise<Response>;
async function get(handler: Handler, path: string, query = '') {
	const url = new URL(`http://headroom.test${path}?${query}`);
	const user = r.users.viewer;
	return handler({ url, request: new Request(url), params: {}, locals: { user, scopes: ['read'], requestId: 't' } } as never);
}
async function page(query: string): Promise<{ items: LoopListItem[]; total: number; page: number; pageSize: number }> {
	const res = await get(list.GET, '/api/loops', query);
	expect(res.status, query).toBe(200);
	return res.json();
}
const keys = async (query: string) => (await page(query)).items.map((l) => l.key);

describe('GET /api/loops filters', () => {
	it('by verdict, product, class, owner (e-mail or id), tag and text', async () => {
		expect(await keys('verdict=noncompliant')).toEqual(['b-pm', 'c-gm']);
		expect(await keys('verdict=covered')).toEqual(['f-covered']);
		expect(await keys('product=stage')).toEqual(['d-unstable', 'e-empty', 'f-covered']);
		expect(await keys('class=current')).toEqual(['c-gm', 'e-empty']);
		expect(await keys('class=speed&verdict=noncompliant')).toEqual(['b-pm']);
		expect(await keys(`owner=${encodeURIComponent(r.users.engineer2.email.toUpperCase())}`)).toEqual(['c-gm', 'f-covered']);
		expect(await keys(`owner=${r.users.engineer2.id}`)).toEqual(['c-gm', 'f-covered']);
		expect(await keys('tag=rig-b')).toEqual(['c-gm', 'f-covered']);
		expect(await keys('q=STAGE')).toEqual(['d-unstable', 'f-covered']);
		expect(await keys('q=a-o')).toEqual(['a-ok']);
		// Wildcards are text, not patterns.
		expect(await keys('q=100%25')).toEqual(['b-pm']);
		expect(await keys('q=%25')).toEqual(['b-pm']);
	});

	it('by a criterion that falls short, covered by a deviation or not', async () => {
		expect(await keys('failing=phaseMargin')).toEqual(['b-pm', 'f-covered', 'd-unstable'].sort());
		expect(await keys('failing=upperGainMargin')).toEqual(['c-gm', 'd-unstable']);
		expect(await keys('failing=modulusMargin')).toEqual(['d-unstable']);
		expect(await keys('failing=crossoverBand')).toEqual([]);
		expect(await keys('failing=phaseMargin&verdict=noncompliant')).toEqual(['b-pm']);
	});

	it('by change since a date: verdict changed or a revision uploaded at or after it', async () => {
		// b-pm got a revision on 2026-06-01; c-gm's verdict changed on 2026-07-01.
		expect(await keys('changedSince=2026-05-01')).toEqual(['b-pm', 'c-gm']);
		expect(await keys('changedSince=2026-06-01T00:00:00Z')).toEqual(['b-pm', 'c-gm']);
		expect(await keys('changedSince=2026-06-01T00:00:01Z')).toEqual(['c-gm']);
		expect(await keys('changedSince=2026-06-30T21:00:00-02:00')).toEqual(['c-gm']);
		expect(await keys('changedSince=2026-06-30T23:00:00-02:00')).toEqual([]);
		expect(await keys('changedSince=2026-07-02')).toEqual([]);
	});

	it('hides archived loops unless asked', async () => {
		expect(await keys('')).not.toContain('g-archived');
		expect(await keys('archived=archived')).toEqual(['g-archived']);
		expect((await keys('archived=all')).length).toBe(7);
	});
});

describe('GET /api/loops items', () => {
	it('carry the worst-case margins next to their targets, with the shortfall per criterion', async () => {
		const [b] = (await page('q=b-pm')).items;
		expect(b.verdict).toBe('noncompliant');
		expect(b.worstCase).toEqual({ phaseMarginDeg: 40, upperGainMarginDb: 10, delayMarginS: 0.005, modulusMargin: 0.7 });
		expect(b.failing).toEqual(['phaseMargin']);
		expect(b.worstShortfall).toBeCloseTo(5 / 45, 12);
		const pm = b.criteria.find((c) => c.criterion === 'phaseMargin')!;
		expect(pm).toMatchObject({ status: 'fail', required: '45', actual: 40, shortfall: '5', comparison: 'at least' });
		expect(b.criteria.find((c) => c.criterion === 'upperGainMargin')).toMatchObject({ status: 'pass', shortfall: null });
		const [f] = (await page('q=f-covered')).items;
		expect(f).toMatchObject({ verdict: 'covered', failing: ['phaseMargin'], activeDeviations: 1 });
		expect(f.criteria.find((c) => c.criterion === 'phaseMargin')).toMatchObject({ status: 'covered', shortfall: '3' });
		expect(Number(f.criteria.find((c) => c.criterion === 'phaseMargin')!.relaxedTo)).toBe(40);
		const [e] = (await page('q=e-empty')).items;
		expect(e).toMatchObject({ verdict: 'empty', criteria: [], failing: [], worstShortfall: null });
		expect(e.worstCase.phaseMarginDeg).toBeNull();
	});
});

describe('GET /api/loops sorts and pages', () => {
	const margin = (l: LoopListItem, sort: string) =>
		({
			phaseMargin: l.worstCase.phaseMarginDeg === null ? null : Math.abs(l.worstCase.phaseMarginDeg),
			upperGainMargin: l.worstCase.upperGainMarginDb,
			delayMargin: l.worstCase.delayMarginS,
			modulusMargin: l.worstCase.modulusMargin,
			shortfall: l.worstShortfall
		})[sort] as number | null;

	it.each(['phaseMargin', 'upperGainMargin', 'delayMargin', 'modulusMargin', 'shortfall'])('by %s both ways, loops without a value last', async (sort) => {
		for (const dir of ['asc', 'desc'] as const) {
			const values = (await page(`sort=${sort}&dir=${dir}`)).items.map((l) => margin(l, sort));
			const present = values.filter((v) => v !== null) as number[];
			expect(values.slice(present.length).every((v) => v === null), `${sort} ${dir}: ${values}`).toBe(true);
			const sorted = [...present].sort((a, b) => (dir === 'asc' ? a - b : b - a));
			expect(present).toEqual(sorted);
			expect(present.length).toBeGreaterThan(1);
		}
	});

	it('by shortfall puts the loops furthest from their targets first', async () => {
		// unstable (whole target missing) 1, c-gm 4/8, b-pm 5/45, f-covered 3/45; then no shortfall.
		expect(await keys('sort=shortfall&dir=desc')).toEqual(['d-unstable', 'c-gm', 'b-pm', 'f-covered', 'a-ok', 'e-empty']);
	});

	it('by verdict from best to worst, and by the registry columns', async () => {
		expect((await keys('sort=verdict&dir=desc')).slice(0, 3)).toEqual(['d-unstable', 'b-pm', 'c-gm']);
		expect(await keys('sort=key&dir=desc')).toEqual(['f-covered', 'e-empty', 'd-unstable', 'c-gm', 'b-pm', 'a-ok']);
		expect(await keys('sort=name')).toEqual(['e-empty', 'a-ok', 'b-pm', 'c-gm', 'd-unstable', 'f-covered']);
		expect((await keys('sort=product&dir=desc')).slice(0, 3)).toEqual(['d-unstable', 'e-empty', 'f-covered']);
		expect((await keys('sort=class')).slice(0, 2)).toEqual(['c-gm', 'e-empty']);
		expect((await keys('sort=owner&dir=desc')).slice(0, 2)).toEqual(['c-gm', 'f-covered']);
		expect((await keys('sort=updatedAt&dir=desc')).length).toBe(6);
		for (const sort of LOOP_SORTS) expect((await page(`sort=${sort}`)).total).toBe(6);
	});

	it('pages without overlap and with the total of matching loops', async () => {
		const seen: string[] = [];
		for (let p = 1; p <= 3; p++) {
			const body = await page(`sort=shortfall&dir=desc&pageSize=2&page=${p}`);
			expect([body.total, body.page, body.pageSize, body.items.length]).toEqual([6, p, 2, 2]);
			seen.push(...body.items.map((l) => l.key));
		}
		expect(seen).toEqual(await keys('sort=shortfall&dir=desc'));
		const beyond = await page('pageSize=2&page=9');
		expect([beyond.items.length, beyond.total]).toEqual([0, 6]);
	});
});

describe('bad parameters', () => {
	it.each([
		['verdict=fine', 'verdict'],
		['failing=gain', 'failing'],
		['sort=margin', 'sort'],
		['dir=up', 'dir'],
		['archived=maybe', 'archived'],
		['changedSince=yesterday', 'changedSince'],
		['changedSince=2026-13-45', 'changedSince'],
		['changedSince=2026-06-01T25:00:00Z', 'changedSince'],
		['page=0', 'page'],
		['pageSize=201', 'pageSize'],
		['pageSize=ten', 'pageSize']
	])('%s is a 400 naming %s, on the list, the counts and the export', async (query, path) => {
		for (const [handler, route] of [
			[list.GET, '/api/loops'],
			[summary.GET, '/api/loops/summary'],
			[exportCsv.GET, '/api/loops/export.csv']
		] as const) {
			if (route !== '/api/loops' && path.startsWith('page')) continue;
			const res = await get(handler as Handler, route, query);
			expect(res.status, `${route}?${query}`).toBe(400);
			expect((await res.json()).error).toMatchObject({ code: 'invalid', path });
		}
	});

	it('answers anonymous callers 401', async () => {
		const url = new URL('http://headroom.test/api/loops/export.csv');
		const res = await exportCsv.GET({ url, request: new Request(url), params: {}, locals: { user: null, scopes: [], requestId: 't' } } as never);
		expect(res.status).toBe(401);
	});
});

describe('GET /api/loops/summary', () => {
	it('counts verdicts within the current scope, and products and classes by verdict', async () => {
		const res = await get(summary.GET, '/api/loops/summary', 'class=speed&verdict=compliant');
		expect(res.status).toBe(200);
		const body = await res.json();
		// The verdict filter does not narrow the verdict counts: they are what a click would pick.
		expect(body.total).toBe(4);
		expect(body.verdicts).toMatchObject({ compliant: 1, noncompliant: 1, unstable: 1, covered: 1, empty: 0 });
		expect(body.products).toEqual([
			{ key: 'drive', name: 'Drive', total: 2, verdicts: expect.objectContaining({ compliant: 1, noncompliant: 1 }) },
			{ key: 'stage', name: 'Stage', total: 2, verdicts: expect.objectContaining({ unstable: 1, covered: 1 }) }
		]);
		// Classes ignore the class filter (every class under the other filters).
		expect(body.classes.map((c: { key: string; total: number }) => [c.key, c.total])).toEqual([
			['current', 2],
			['speed', 4]
		]);
		const stage = await (await get(summary.GET, '/api/loops/summary', 'product=stage')).json();
		expect(stage.verdicts).toMatchObject({ unstable: 1, empty: 1, covered: 1, noncompliant: 0 });
		expect(stage.products.map((p: { key: string }) => p.key)).toEqual(['drive', 'stage']);
	});
});

describe('GET /api/loops/export.csv', () => {
	it('downloads every matching loop in the list order, with documented columns', async () => {
		const res = await get(exportCsv.GET, '/api/loops/export.csv', 'sort=shortfall&dir=desc&pageSize=1');
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8');
		expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="headroom-loops-\d{8}-\d{4}\.csv"$/);
		expect(res.headers.get('x-total-count')).toBe('6');
		const records = parseCsv(await res.text()).map((rec) => rec.fields);
		expect(records[0]).toEqual(EXPORT_COLUMNS);
		// Paging does not apply: the export holds every matching loop.
		expect(records.slice(1).map((f) => f[3])).toEqual(['d-unstable', 'c-gm', 'b-pm', 'f-covered', 'a-ok', 'e-empty']);
		const row = (key: string) => Object.fromEntries(EXPORT_COLUMNS.map((c, i) => [c, records.find((f) => f[3] === key)![i]]));
		expect(row('b-pm')).toMatchObject({
			product: 'drive',
			class: 'speed',
			verdict: 'noncompliant',
			failing: 'phaseMargin',
			phase_margin_deg: '40',
			phase_margin_deg_target: '45',
			phase_margin_deg_shortfall: '5',
			phase_margin_deg_status: 'fail',
			upper_gain_margin_db_status: 'pass',
			owner_email: r.users.engineer.email
		});
		expect(row('f-covered')).toMatchObject({ verdict: 'covered', active_deviations: '1', phase_margin_deg_status: 'covered' });
		expect(row('c-gm')).toMatchObject({ delay_margin_s_status: 'no-target', delay_margin_s: '0.005', delay_margin_s_target: '' });
		// A name a spreadsheet would run as a formula is defused.
		expect(row('e-empty').loop_name).toBe("'=SUM(1) current");
	});

	it('honours the filters', async () => {
		const res = await get(exportCsv.GET, '/api/loops/export.csv', 'failing=phaseMargin&verdict=noncompliant');
		const records = parseCsv(await res.text());
		expect(records.map((rec) => rec.fields[3])).toEqual(['loop_key', 'b-pm']);
		expect(loops.pm.key).toBe('b-pm');
	});
});
