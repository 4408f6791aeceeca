/**
 * Pages of GET /api/loops kept in memory until the registry changes (listLoopsBody over
 * db/registry-changes.ts): reused while nothing was written, answered afresh after a notified
 * write to a loop or a deviation, and when a deviation on the page starts or expires with no
 * write at all; the memory they take is bounded.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { dashboardScenario } from './support';
import { changeHelpers } from './changes-support';
import type { Registry } from '../registry/support';
import { listLoopsBody, listLoopsJson } from '../../../src/lib/server/registry/loops';
import type { LoopFilters } from '../../../src/lib/server/registry/loop-query';
import {
	changeStamp,
	MAX_BYTES,
	remembered,
	resultUsage,
	startRegistryChanges,
	stopRegistryChanges
} from '../../../src/lib/server/db/registry-changes';

let r: Registry;
let loops: Awaited<ReturnType<typeof dashboardScenario>>['loops'];
beforeAll(async () => {
	({ r, loops } = await dashboardScenario('dash_pages'));
	await startRegistryChanges(r.db.url);
});
afterAll(async () => {
	await stopRegistryChanges();
	await r?.close();
});

const { exec, silentCopy, notified, settled } = changeHelpers(() => r);
const paging = { page: 1, pageSize: 50 };
interface Page {
	items: { key: string; activeDeviations: number }[];
	total: number;
}
const body = async (f: LoopFilters = { sort: 'key' }) =>
	JSON.parse(new TextDecoder().decode(await listLoopsBody(r.em(), f, paging))) as Page;
const item = (page: Page, key: string) => page.items.find((l) => l.key === key)!;
const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms));

beforeEach(async () => {
	if (changeStamp(r.em()) !== undefined) await settled();
});

describe('pages of the loop list kept between writes', () => {
	it('answer what the database says, and keep it until a write is notified', async () => {
		const first = await body();
		expect(first).toEqual(JSON.parse(await listLoopsJson(r.em(), { sort: 'key' }, paging)));
		await silentCopy('a-ok', 'a-ok-copy');
		// the database holds one more loop; the kept page does not know yet
		expect(await body()).toEqual(first);
		const stamp = changeStamp(r.em());
		await exec(`update loop set note = 'touched' where key = 'a-ok'`);
		await notified(stamp);
		const after = await body();
		expect(after.total).toBe(first.total + 1);
		expect(item(after, 'a-ok-copy')).toBeDefined();
	});

	it('are per filter and page', async () => {
		const speed = await body({ class: 'speed', sort: 'key' });
		const current = await body({ class: 'current', sort: 'key' });
		expect(speed.items.map((l) => l.key)).not.toEqual(current.items.map((l) => l.key));
		const second = JSON.parse(
			new TextDecoder().decode(
				await listLoopsBody(r.em(), { sort: 'key' }, { page: 2, pageSize: 2 })
			)
		) as Page;
		expect(second.items.map((l) => l.key)).toEqual(
			(await body()).items.slice(2, 4).map((l) => l.key)
		);
	});

	it('follow a deviation revoked (the deviation table notifies too)', async () => {
		expect(item(await body(), 'f-covered').activeDeviations).toBe(1);
		const stamp = changeStamp(r.em());
		// straight to the table, so no loop is written and only the deviation trigger notifies
		await exec(`update deviation set revoked_at = now(), revoked_by_id = ? where loop_id = ?`, [
			r.users.lead.id,
			loops.covered.id
		]);
		await notified(stamp);
		expect(item(await body(), 'f-covered').activeDeviations).toBe(0);
	});

	it('end when a deviation on the page starts, with no write at all', async () => {
		await exec(
			`insert into deviation (loop_id, criteria, min_phase_margin_deg, reason, approved_by_id, starts_at, expires_at)
			 values (?, '{phaseMargin}', 30, 'Starts in a moment.', ?, now() + interval '1.5 seconds', now() + interval '1 day')`,
			[loops.pm.id, r.users.lead.id]
		);
		await settled();
		const stamp = changeStamp(r.em());
		expect(item(await body(), 'b-pm').activeDeviations).toBe(0);
		await sleep(1700);
		expect(item(await body(), 'b-pm').activeDeviations).toBe(1);
		// nothing was notified in between: the kept page ended by its own clock
		expect(changeStamp(r.em())).toBe(stamp);
	});

	it('make an entity manager only when a page has to be read', async () => {
		let forks = 0;
		const source = async () => (forks++, r.em());
		const f: LoopFilters = { class: 'speed', sort: 'name', dir: 'desc' };
		const first = await listLoopsBody(source, f, paging);
		expect(forks).toBe(1);
		const again = await listLoopsBody(source, f, paging);
		expect(forks).toBe(1); // the kept page: no fork
		expect(again).toBe(first);
		const stamp = changeStamp(r.em());
		await exec(`update loop set note = 'forked' where key = 'a-ok'`);
		await notified(stamp);
		await listLoopsBody(source, f, paging);
		expect(forks).toBe(2);
	});

	it('keep at most MAX_BYTES, dropping the oldest', async () => {
		const big = 'x'.repeat(MAX_BYTES / 2 / 3 + 1); // a third of the budget and a little more
		for (const key of ['one', 'two', 'three'])
			await remembered(r.em(), `test.big ${key}`, async () => big);
		expect(resultUsage().bytes).toBeLessThanOrEqual(MAX_BYTES);
		let computed = false;
		await remembered(r.em(), 'test.big one', async () => ((computed = true), big));
		expect(computed).toBe(true); // the oldest went first
		computed = false;
		await remembered(r.em(), 'test.big three', async () => ((computed = true), big));
		expect(computed).toBe(false);
	});
});
