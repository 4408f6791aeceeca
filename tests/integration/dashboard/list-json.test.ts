/**
 * GET /api/loops answers with JSON kept per loop by triggers (loop.list_item, listLoopsJson);
 * the dashboard, the export and the reports read the same page as objects built from the live
 * columns (listLoops). Both must say exactly the same thing, for every sort, direction, filter
 * and page, nulls, arrays and dates included, and still after every kind of write.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dashboardScenario } from './support';
import type { Registry } from '../registry/support';
import { listLoops, listLoopsJson, updateLoop } from '../../../src/lib/server/registry/loops';
import { updateClass } from '../../../src/lib/server/registry/classes';
import { listDeviations, revokeDeviation } from '../../../src/lib/server/registry/deviations';
import { judgeLoops } from '../../../src/lib/server/verdicts/judge-loops';
import { addComputedRevision } from './support';
import { LOOP_SORTS, type LoopFilters } from '../../../src/lib/server/registry/loop-query';

let r: Registry;
let loops: Awaited<ReturnType<typeof dashboardScenario>>['loops'];
beforeAll(async () => {
	({ r, loops } = await dashboardScenario('dash_json'));
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

	it('stays equal after every kind of write: edits, moves, renames, judgements, deviations', async () => {
		const lead = r.users.lead;
		const all = () => same({ archived: 'all', sort: 'key' }, 1, 50);
		const item = async (key: string) => (await all()).items.find((l) => l.key === key)!;
		const conn = r.em().getConnection();

		await updateLoop(r.em(), lead, loops.ok.id, {
			name: 'Axis A speed (rev B)',
			tags: ['rig-c'],
			note: 'Retuned.'
		});
		expect(await item('a-ok')).toMatchObject({
			name: 'Axis A speed (rev B)',
			tags: ['rig-c'],
			note: 'Retuned.'
		});

		await updateLoop(r.em(), lead, loops.pm.id, {
			product: 'stage',
			class: 'current',
			owner: r.users.engineer2.email
		});
		expect(await item('b-pm')).toMatchObject({
			product: { key: 'stage' },
			class: { key: 'current' },
			owner: { email: r.users.engineer2.email }
		});

		await updateClass(r.em(), lead, 'speed', { name: 'Speed loop (2027)' });
		expect((await item('d-unstable')).class.name).toBe('Speed loop (2027)');

		// No screen renames a product or a user yet; the triggers follow any write all the same.
		await conn.execute(
			`update product set key = 'stage-2', name = 'Stage Mk2' where key = 'stage'`
		);
		expect((await item('d-unstable')).product).toMatchObject({ key: 'stage-2', name: 'Stage Mk2' });
		await conn.execute(
			`update app_user set name = 'E. Second', email = 'second@registry.test' where id = ?`,
			[r.users.engineer2.id]
		);
		expect((await item('f-covered')).owner).toMatchObject({
			name: 'E. Second',
			email: 'second@registry.test'
		});

		await addComputedRevision(
			r,
			loops.ok.id,
			{ phaseMarginDeg: 30, upperGainMarginDb: 10, delayMarginSeconds: 0.005, modulusMargin: 0.7 },
			'2026-08-01T00:00:00.000Z'
		);
		await r.em().transactional((tx) => judgeLoops(tx, [loops.ok.id], 'revision'));
		expect(await item('a-ok')).toMatchObject({
			verdict: 'noncompliant',
			worstCase: { phaseMarginDeg: 30 }
		});

		await updateLoop(r.em(), lead, loops.gm.id, { archived: true });
		expect((await item('c-gm')).archivedAt).not.toBeNull();

		// Deviations in force are counted when the page is read, not when the item was written.
		const [deviation] = await listDeviations(r.em(), loops.covered.id);
		await revokeDeviation(r.em(), lead, deviation.id);
		expect((await item('f-covered')).activeDeviations).toBe(0);
	});
});
