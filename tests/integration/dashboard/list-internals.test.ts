/**
 * What makes the loop list fast, checked for what it must not change: the trigger that keeps
 * loop.last_revision_at, the named prepared statements (same rows as `execute`, inside and
 * outside transactions, and past the cap on named statements), and the sort indexes the
 * planner is meant to walk.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addComputedRevision, dashboardScenario, OLD } from './support';
import type { Registry } from '../registry/support';
import {
	MAX_NAMED_STATEMENTS,
	numberPlaceholders,
	preparedRows
} from '../../../src/lib/server/db/prepared';
import { listQuery, queryLoops } from '../../../src/lib/server/registry/loops';
import { SORT_INDEX_INCLUDE, SORT_INDEXES } from '../../../src/lib/server/registry/loop-sort-keys';

let r: Registry;
let loops: Awaited<ReturnType<typeof dashboardScenario>>['loops'];
beforeAll(async () => {
	({ r, loops } = await dashboardScenario('dash_internals'));
});
afterAll(async () => {
	await r?.close();
});

const lastRevisionAt = async (id: string) => {
	const [row] = await r
		.em()
		.getConnection()
		.execute<{ at: string | null }[]>(
			`select last_revision_at::text as at from loop where id = ?`,
			[id]
		);
	return row.at === null ? null : new Date(row.at).toISOString();
};

describe('loop.last_revision_at', () => {
	it('is the newest upload of the loop, whatever order revisions arrive in', async () => {
		// From the scenario: one revision uploaded on OLD, b-pm's on 2026-06-01; e-empty has none.
		expect(await lastRevisionAt(loops.ok.id)).toBe(OLD);
		expect(await lastRevisionAt(loops.pm.id)).toBe('2026-06-01T00:00:00.000Z');
		expect(await lastRevisionAt(loops.empty.id)).toBeNull();
		// An older upload (a back-filled revision) does not move it back.
		await addComputedRevision(
			r,
			loops.pm.id,
			{ phaseMarginDeg: 60, upperGainMarginDb: 10, delayMarginSeconds: 0.005, modulusMargin: 0.7 },
			'2026-02-01T00:00:00.000Z'
		);
		expect(await lastRevisionAt(loops.pm.id)).toBe('2026-06-01T00:00:00.000Z');
	});

	it('takes the newest of many rows inserted by one statement, for every loop in it', async () => {
		const conn = r.em().getConnection();
		await conn.execute(
			`insert into revision (id, loop_id, number, state, object_key, file_name, uploaded_by_id, uploaded_at)
			 select gen_random_uuid(), l.id, 100 + g, 'queued', 'bulk/' || l.id || '/' || g, 'model.json', ?, ?::timestamptz + g * interval '1 day'
			 from loop l cross join generate_series(1, 3) g where l.id in (?, ?)`,
			[r.users.lead.id, '2026-08-01T00:00:00Z', loops.empty.id, loops.gm.id]
		);
		expect(await lastRevisionAt(loops.empty.id)).toBe('2026-08-04T00:00:00.000Z');
		expect(await lastRevisionAt(loops.gm.id)).toBe('2026-08-04T00:00:00.000Z');
		expect(await lastRevisionAt(loops.ok.id)).toBe(OLD);
	});
});

describe('prepared statements', () => {
	it('number ? placeholders in order', () => {
		expect(numberPlaceholders('select ? where a = ? and b @> array[?::text]')).toBe(
			'select $1 where a = $2 and b @> array[$3::text]'
		);
	});

	it('answer the same rows and types as execute, in and out of a transaction', async () => {
		const q = listQuery({ sort: 'phaseMargin', dir: 'desc' }, 50, 0);
		const viaExecute = await r.em().getConnection().execute(q.sql, q.params);
		const prepared = await preparedRows(r.em(), q.sql, q.params);
		expect(prepared).toEqual(viaExecute);
		expect(prepared.length).toBeGreaterThan(3);
		const inTx = await r.em().transactional((tx) => preparedRows(tx, q.sql, q.params));
		expect(inTx).toEqual(viaExecute);
	});

	it('past the cap on named statements still answer, unnamed', async () => {
		for (let i = 0; i <= MAX_NAMED_STATEMENTS + 5; i++) {
			const [row] = await preparedRows<{ n: number }>(r.em(), `select ?::int + ${i} as n`, [1]);
			expect(row.n).toBe(1 + i);
		}
	});

	it('report a bad statement as an error, and the pool keeps working', async () => {
		await expect(
			preparedRows(r.em(), 'select * from no_such_table where id = ?', [1])
		).rejects.toThrow(/no_such_table/);
		expect((await queryLoops(r.em(), { sort: 'key' }, 2, 0)).map((l) => l.key)).toEqual([
			'a-ok',
			'b-pm'
		]);
	});
});

describe('sort indexes', () => {
	it('exist in the database exactly as loop-sort-keys.ts declares them', async () => {
		const rows = await r
			.em()
			.getConnection()
			.execute<{ indexname: string; indexdef: string }[]>(
				`select indexname, indexdef from pg_indexes where tablename = 'loop' and indexname like 'loop_sort_%'`
			);
		expect(rows.map((x) => x.indexname).sort()).toEqual(SORT_INDEXES.map((i) => i.name).sort());
		const include = `INCLUDE (${SORT_INDEX_INCLUDE.join(', ')})`;
		for (const row of rows) {
			expect(row.indexdef).toMatch(/WHERE \(archived_at IS NULL\)$/);
			expect(row.indexdef, row.indexname).toContain(include);
		}
	});

	const planOf = (q: { sql: string; params: unknown[] }) =>
		r.em().transactional(async (tx) => {
			const conn = tx.getConnection();
			const ctx = tx.getTransactionContext();
			// Few rows here: without this the planner would rightly prefer sorting them.
			await conn.execute('set local enable_sort = off', [], 'all', ctx);
			return (
				await conn.execute<{ 'QUERY PLAN': string }[]>(`explain ${q.sql}`, q.params, 'all', ctx)
			)
				.map((x) => x['QUERY PLAN'])
				.join('\n');
		});

	it('are what the planner walks for a page sorted on a loop column', async () => {
		expect(await planOf(listQuery({ sort: 'delayMargin', dir: 'desc' }, 50, 0))).toContain(
			'loop_sort_delay_margin_desc'
		);
	});

	it('answer a filtered page without reading the loops it skips (index-only)', async () => {
		// the visibility map must know the rows, as it does on a live table that autovacuum keeps
		await r.em().getConnection().execute('vacuum analyze loop');
		const f = { class: 'speed', verdict: 'noncompliant' as const, failing: 'phaseMargin' as const };
		const plan = await planOf(listQuery({ ...f, sort: 'phaseMargin', dir: 'asc' }, 50, 20));
		expect(plan).toMatch(/Index Only Scan using loop_sort_phase_margin_asc/);
	});
});
