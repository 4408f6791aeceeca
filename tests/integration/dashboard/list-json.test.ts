/**
 * GET /api/loops answers with JSON that PostgreSQL renders (listLoopsJson); the dashboard, the
 * export and the reports read the same page as objects (listLoops). Both must say exactly the
 * same thing, for every sort, direction, filter and page, nulls, arrays and dates included.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dashboardScenario } from './support';
import type { Registry } from '../registry/support';
import { listLoops, listLoopsJson } from '../../../src/lib/server/registry/loops';
import { LOOP_SORTS, type LoopFilters } from '../../../src/lib/server/registry/loop-query';

let r: Registry;
beforeAll(async () => {
	({ r } = await dashboardScenario('dash_json'));
	// Values whose text forms differ between PostgreSQL and JavaScript: tiny and huge floats, a
	// note with quotes, a backslash, a line break and letters beyond ASCII.
	await r
		.em()
		.getConnection()
		.execute(
			`update loop set wc_delay_margin_s = 1.5e-7, worst_shortfall = 1e21, note = ? where key = 'a-ok'`,
			['Said "hold" \\ then\nŁódź Ωmega']
		);
});
afterAll(async () => {
	await r?.close();
});

const same = async (f: LoopFilters, page = 1, pageSize = 3) => {
	const paging = { page, pageSize };
	const text = await listLoopsJson(r.em(), f, paging);
	const objects = await listLoops(r.em(), f, paging);
	expect(JSON.parse(text), JSON.stringify({ f, page })).toEqual(objects);
	return objects;
};

describe('the API page rendered by PostgreSQL', () => {
	it('equals the objects for every sort and direction, page by page', async () => {
		for (const sort of LOOP_SORTS)
			for (const dir of ['asc', 'desc'] as const)
				for (const page of [1, 2, 3]) await same({ sort, dir, archived: 'all' }, page);
	});

	it('equals the objects for every filter', async () => {
		const filters: LoopFilters[] = [
			{ verdict: 'noncompliant' },
			{ verdict: 'covered' },
			{ product: 'stage' },
			{ class: 'current' },
			{ owner: 'engineer2@registry.test' },
			{ failing: 'phaseMargin' },
			{ tag: 'rig-b' },
			{ q: 'speed' },
			{ q: '100%' },
			{ changedSince: new Date('2026-06-15T00:00:00Z') },
			{ archived: 'archived' },
			{ product: 'nothing-like-it' }
		];
		for (const f of filters) await same(f, 1, 10);
	});

	it('carries the values and the total as they are', async () => {
		const all = await same({ archived: 'all', sort: 'key' }, 1, 50);
		const a = all.items.find((l) => l.key === 'a-ok')!;
		expect(a.note).toBe('Said "hold" \\ then\nŁódź Ωmega');
		expect(a.worstCase.delayMarginS).toBe(1.5e-7);
		expect(a.worstShortfall).toBe(1e21);
		expect(all.items.find((l) => l.key === 'f-covered')!.activeDeviations).toBe(1);
		expect(all.items.find((l) => l.key === 'e-empty')!.criteria).toEqual([]);
		expect(all.total).toBe(7);
	});

	it('answers an empty page past the end with the total', async () => {
		const page = await same({ archived: 'all' }, 40, 3);
		expect(page.items).toEqual([]);
		expect(page.total).toBe(7);
	});
});
