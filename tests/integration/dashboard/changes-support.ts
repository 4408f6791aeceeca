/**
 * Helpers for tests of results kept until the registry changes (db/registry-changes.ts):
 * writes that notify nobody, and waits on the listener.
 */
import { expect } from 'vitest';
import type { Registry } from '../registry/support';
import { changeStamp } from '../../../src/lib/server/db/registry-changes';

export function changeHelpers(registry: () => Registry) {
	const exec = (sql: string, params: unknown[] = []) =>
		registry().em().getConnection().execute(sql, params);
	const stamp = () => changeStamp(registry().em());
	/** Insert a copy of loop `key` as `newKey` without notifying anyone (trigger off). */
	async function silentCopy(key: string, newKey: string) {
		await exec('alter table loop disable trigger loop_notify_change');
		try {
			await exec(
				`insert into loop (id, product_id, loop_class_id, key, name, owner_id, tags, note, verdict, verdict_detail,
				   failing_criteria, worst_shortfall, wc_phase_margin_deg, created_at, updated_at)
				 select gen_random_uuid(), product_id, loop_class_id, ?, name, owner_id, tags, note, verdict, verdict_detail,
				   failing_criteria, worst_shortfall, wc_phase_margin_deg, now(), now() from loop where key = ?`,
				[newKey, key]
			);
		} finally {
			await exec('alter table loop enable trigger loop_notify_change');
		}
	}

	/** Wait (≤ 5 s) until the listener has seen a notification: the stamp moves on. */
	async function notified(before: number | undefined) {
		for (let i = 0; i < 100 && stamp() === before; i++)
			await new Promise((ok) => setTimeout(ok, 50));
		expect(stamp()).not.toBe(before);
	}

	/**
	 * Wait until no notification is on its way: send one and wait for the stamp to move, then until
	 * it has stayed put for 150 ms (a late notification of the previous test's writes may be the one
	 * that moved it first), so none drops an entry in the middle of the next test.
	 */
	async function settled() {
		const before = stamp();
		await exec(`select pg_notify('headroom_registry', 'test')`);
		await notified(before);
		for (let quiet = stamp(); ;) {
			await new Promise((ok) => setTimeout(ok, 150));
			const now = stamp();
			if (now === quiet) return;
			quiet = now;
		}
	}

	return { exec, silentCopy, notified, settled };
}
