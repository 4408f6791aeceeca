/**
 * What a bearer value stands for, kept in the web server until the registry changes
 * (resolveToken over db/registry-changes.ts): reused while nothing was written, and ended by a
 * revocation, a role change or a deactivation as soon as PostgreSQL notifies it. "Last used" is
 * still stamped once a minute, and stamping notifies no one.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { setupRegistry, type Registry } from '../registry/support';
import { changeHelpers } from '../dashboard/changes-support';
import { createToken, resolveToken } from '../../../src/lib/server/auth/tokens';
import {
	changeStamp,
	startRegistryChanges,
	stopRegistryChanges
} from '../../../src/lib/server/db/registry-changes';

let r: Registry;
beforeAll(async () => {
	r = await setupRegistry('auth_token_cache');
	await startRegistryChanges(r.db.url);
});
afterAll(async () => {
	await stopRegistryChanges();
	await r?.close();
});

const { exec, notified, settled } = changeHelpers(() => r);
const resolve = (value: string) => resolveToken(r.em(), value);
const newToken = async (name: string) =>
	(await createToken(r.em(), r.users.engineer, { name, scopes: ['read', 'upload'] })).value;

/** Revoke without notifying (the trigger off): only a kept answer can still accept the token. */
async function silentRevoke(value: string) {
	await exec('alter table api_token disable trigger api_token_notify_change');
	try {
		await exec(
			`update api_token set revoked_at = now() where token_hash = encode(sha256(convert_to(?, 'UTF8')), 'hex')`,
			[value]
		);
	} finally {
		await exec('alter table api_token enable trigger api_token_notify_change');
	}
}

beforeEach(async () => {
	await settled();
});

describe('bearer tokens kept between changes', () => {
	it('make an entity manager only to look a token up or to stamp it', async () => {
		const value = await newToken('lazy');
		await settled();
		let forks = 0;
		const source = async () => (forks++, r.em());
		expect((await resolveToken(source, value))?.user.id).toBe(r.users.engineer.id);
		expect(forks).toBe(2); // the lookup, and the stamp of a token never used
		expect((await resolveToken(source, value))?.user.id).toBe(r.users.engineer.id);
		expect(forks).toBe(2); // kept and stamped within the minute: no fork
	});

	it('are reused while nothing is notified, and refused once a revocation is', async () => {
		const value = await newToken('kept');
		await settled();
		expect((await resolve(value))?.user.id).toBe(r.users.engineer.id);
		await silentRevoke(value);
		// revoked in the database, still known here: this is the kept answer
		expect((await resolve(value))?.user.id).toBe(r.users.engineer.id);
		const stamp = changeStamp(r.em());
		await exec(`update api_token set revoked_at = now() where revoked_at is not null`);
		await notified(stamp);
		expect(await resolve(value)).toBeNull();
	});

	it('shrink with a role change and end with a deactivation (app_user notifies)', async () => {
		const value = await newToken('roles');
		expect((await resolve(value))?.scopes).toContain('upload');
		let stamp = changeStamp(r.em());
		await exec(`update app_user set role = 'viewer' where id = ?`, [r.users.engineer.id]);
		await notified(stamp);
		expect((await resolve(value))?.scopes).toEqual(['read']);
		stamp = changeStamp(r.em());
		await exec(`update app_user set active = false where id = ?`, [r.users.engineer.id]);
		await notified(stamp);
		expect(await resolve(value)).toBeNull();
		await exec(`update app_user set role = 'engineer', active = true where id = ?`, [
			r.users.engineer.id
		]);
	});

	it('never keep a value that is not a token', async () => {
		expect(await resolve('hr_not-a-token-at-all')).toBeNull();
		const value = await newToken('later');
		// had the miss been kept under this value's key, it could not resolve before a change
		expect((await resolve(value))?.user.id).toBe(r.users.engineer.id);
	});

	it('stamp "last used" once a minute, without notifying', async () => {
		const value = await newToken('stamped');
		const usedAt = async () =>
			(
				await exec(
					`select last_used_at from api_token where token_hash = encode(sha256(convert_to(?, 'UTF8')), 'hex')`,
					[value]
				)
			)[0].last_used_at as Date | null;
		await settled();
		const stamp = changeStamp(r.em());
		await resolve(value);
		const first = await usedAt();
		expect(first).not.toBeNull();
		await resolve(value);
		expect(await usedAt()).toEqual(first);
		await new Promise((ok) => setTimeout(ok, 300));
		expect(changeStamp(r.em())).toBe(stamp); // stamping notified no one
	});
});
