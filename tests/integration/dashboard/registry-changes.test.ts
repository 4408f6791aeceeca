/**
 * Counts remembered until the registry changes (src/lib/server/db/registry-changes.ts): a total
 * is reused while nothing was written, and forgotten when PostgreSQL notifies a write to any
 * table a filter reads, when this process wrote, inside transactions, and while the listening
 * connection is down.
 *
 * To tell a remembered total from a fresh one, some writes below are made with the notifying
 * trigger switched off: the database then holds more loops than the remembered total says.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { dashboardScenario } from './support';
import { changeHelpers } from './changes-support';
import type { Registry } from '../registry/support';
import { listLoops } from '../../../src/lib/server/registry/loops';
import { loopSummary } from '../../../src/lib/server/registry/loop-summary';
import type { LoopFilters } from '../../../src/lib/server/registry/loop-query';
import {
	changeStamp,
	forgetResults,
	remembered,
	shareResult,
	startRegistryChanges,
	stopRegistryChanges
} from '../../../src/lib/server/db/registry-changes';
import { handleRegistryWrites } from '../../../src/lib/server/hooks/registry-writes';

let r: Registry;
beforeAll(async () => {
	({ r } = await dashboardScenario('dash_changes'));
	await startRegistryChanges(r.db.url);
});
afterAll(async () => {
	await stopRegistryChanges();
	await r?.close();
});

const page = { page: 1, pageSize: 2 };
const total = async (f: LoopFilters) => (await listLoops(r.em(), f, page)).total;
const exec = (sql: string, params: unknown[] = []) => r.em().getConnection().execute(sql, params);
const { silentCopy, notified, settled } = changeHelpers(() => r);
const actual = async (where: string) =>
	(await exec(`select count(*)::int as n from loop where archived_at is null and ${where}`))[0]
		.n as number;

beforeEach(async () => {
	if (changeStamp(r.em()) !== undefined) await settled();
});

describe('remembered totals', () => {
	it('reuse a total until a write is notified, then count afresh', async () => {
		const f: LoopFilters = { class: 'speed' };
		const first = await total(f);
		expect(first).toBe(
			await actual(`loop_class_id = (select id from loop_class where key = 'speed')`)
		);
		await silentCopy('a-ok', 'a-ok-copy1');
		// the database has one more, the remembered total does not know yet
		expect(await total(f)).toBe(first);
		// an ordinary write notifies: the next total is counted again and sees both
		const stamp = changeStamp(r.em());
		await exec(`update loop set note = 'touched' where key = 'a-ok'`);
		await notified(stamp);
		expect(await total(f)).toBe(first + 1);
	});

	it('are per filter: another filter is counted on its own', async () => {
		const speed = await total({ class: 'speed' });
		const current = await total({ class: 'current' });
		expect(current).toBe(
			await actual(`loop_class_id = (select id from loop_class where key = 'current')`)
		);
		expect(speed).not.toBe(current);
	});

	it('follow a renamed product key (the product table notifies too)', async () => {
		expect(await total({ product: 'drive' })).toBeGreaterThan(0);
		const stamp = changeStamp(r.em());
		await exec(`update product set key = 'drive-x' where key = 'drive'`);
		await notified(stamp);
		try {
			expect(await total({ product: 'drive' })).toBe(0);
			expect(await total({ product: 'drive-x' })).toBe(
				await actual(`product_id = (select id from product where key = 'drive-x')`)
			);
		} finally {
			await exec(`update product set key = 'drive' where key = 'drive-x'`);
		}
	});

	it('are forgotten when this process wrote (any request but GET, HEAD, OPTIONS)', async () => {
		const f: LoopFilters = { class: 'speed' };
		const before = await total(f);
		await silentCopy('a-ok', 'a-ok-copy2');
		expect(await total(f)).toBe(before);
		// a GET leaves them
		await handleRegistryWrites({
			event: { request: new Request('http://x/api/loops') },
			resolve: async () => new Response('ok')
		} as never);
		expect(await total(f)).toBe(before);
		// a POST, even one that failed, drops them before its answer leaves
		await expect(
			handleRegistryWrites({
				event: { request: new Request('http://x/api/loops', { method: 'POST' }) },
				resolve: async () => {
					throw new Error('failed half-way');
				}
			} as never)
		).rejects.toThrow('failed half-way');
		expect(await total(f)).toBe(before + 1);
	});

	it('are neither read nor kept inside a transaction', async () => {
		const f: LoopFilters = { class: 'speed' };
		const before = await total(f);
		await r
			.em()
			.transactional(async (tx) => {
				await tx
					.getConnection()
					.execute(
						`update loop set loop_class_id = (select id from loop_class where key = 'speed') where key = 'c-gm'`,
						[],
						'run',
						tx.getTransactionContext()
					);
				expect((await listLoops(tx, f, page)).total).toBe(before + 1);
				throw new Error('roll back');
			})
			.catch((e: Error) => expect(e.message).toBe('roll back'));
		expect(await total(f)).toBe(before);
	});

	it('are not used while the listening connection is down, and resume after it reconnects', async () => {
		const f: LoopFilters = { class: 'speed' };
		const before = await total(f);
		await exec(
			`select pg_terminate_backend(pid) from pg_stat_activity where application_name = 'headroom-changes'`
		);
		for (let i = 0; i < 100 && changeStamp(r.em()) !== undefined; i++)
			await new Promise((ok) => setTimeout(ok, 20));
		expect(changeStamp(r.em())).toBeUndefined();
		await silentCopy('a-ok', 'a-ok-copy3');
		// not listening: every total is counted
		expect(await total(f)).toBe(before + 1);
		// it reconnects on its own (about a second later) and remembers again
		for (let i = 0; i < 100 && changeStamp(r.em()) === undefined; i++)
			await new Promise((ok) => setTimeout(ok, 50));
		expect(changeStamp(r.em())).toBeDefined();
		expect(await total(f)).toBe(before + 1);
		await silentCopy('a-ok', 'a-ok-copy4');
		expect(await total(f)).toBe(before + 1);
		forgetResults();
		expect(await total(f)).toBe(before + 2);
	});

	it('a page past the end still carries the total', async () => {
		const f: LoopFilters = { class: 'speed' };
		const n = await total(f);
		const far = await listLoops(r.em(), f, { page: 99, pageSize: 2 });
		expect(far.items).toEqual([]);
		expect(far.total).toBe(n);
	});
});

describe('requests arriving together', () => {
	it('compute a result once: the first leads, the others wait for its value', async () => {
		const key = 'test.together';
		const first = shareResult<number>(r.em(), key);
		const second = shareResult<number>(r.em(), key);
		expect(first.lead).toBeTypeOf('function');
		expect(second.wait).toBeInstanceOf(Promise);
		first.lead!(42);
		expect(await second.wait).toBe(42);
		expect(second.current()).toBe(true);
		// and now it is known
		expect(shareResult<number>(r.em(), key).known).toBe(42);
	});

	it('go on without the leader when it failed, and do not join a computation from before a change', async () => {
		const key = 'test.failed';
		const leader = shareResult<number>(r.em(), key);
		const waiting = shareResult<number>(r.em(), key);
		leader.lead!(undefined);
		expect(await waiting.wait).toBeUndefined();
		// remembered() computes for itself when the one it waited for failed
		const stale = shareResult<number>(r.em(), key);
		const late = remembered(r.em(), key, async () => 7);
		stale.lead!(undefined);
		expect(await late).toBe(7);
		// a change in between: a new request leads a computation of its own
		const before = shareResult<number>(r.em(), 'test.change');
		forgetResults();
		const after = shareResult<number>(r.em(), 'test.change');
		expect(after.lead).toBeTypeOf('function');
		expect(before.current()).toBe(false);
		before.lead!(1);
		after.lead!(2);
		expect(shareResult<number>(r.em(), 'test.change').known).toBe(2);
	});

	it('share one count between concurrent pages of one filter', async () => {
		const f: LoopFilters = { class: 'current' };
		forgetResults();
		const pages = await Promise.all(
			[1, 2, 3, 1, 2].map((p) => listLoops(r.em(), f, { page: p, pageSize: 1 }))
		);
		const n = await actual(`loop_class_id = (select id from loop_class where key = 'current')`);
		expect(pages.map((p) => p.total)).toEqual([n, n, n, n, n]);
	});
});

describe('remembered dashboard counts', () => {
	it('are reused until a write is notified', async () => {
		const first = await loopSummary(r.em(), { product: 'stage' });
		expect(first.total).toBe(
			await actual(`product_id = (select id from product where key = 'stage')`)
		);
		// the verdict filter plays no part in the counts: the same entry answers
		expect(await loopSummary(r.em(), { product: 'stage', verdict: 'unstable' })).toBe(first);
		const stamp = changeStamp(r.em());
		await exec(`update loop set verdict = 'unstable' where key = 'f-covered'`);
		await notified(stamp);
		const after = await loopSummary(r.em(), { product: 'stage' });
		expect(after).not.toBe(first);
		expect(after.verdicts.unstable).toBe(first.verdicts.unstable + 1);
	});
});
