import { describe, expect, it } from 'vitest';
import { HttpClient } from '../support/http-client';
import { waitForMessage } from '../support/mail';
import { appEnv, linkIn, me, signIn } from './flows';
import { DEMO_ROLE_SCOPES, useAuthApp } from './support';

const auth = useAuthApp('auth_tokens', { signInAdmin: true });
const bearer = (token: string) => me(auth.client(), token);

/** Creates a token through the page's form and reads its one-time value from the answer. */
async function createToken(client: HttpClient, name: string, scopes: string[]) {
	const response = await client.post('/settings/tokens?/create', { name, scopes });
	const html = await response.text();
	const value = /data-testid="new-token-value"[^>]*>(hr_[\w-]+)</.exec(html)?.[1];
	return { status: response.status, html, value };
}

/** A fresh account with a password, signed in; returns its client and id. */
async function newMember(role: string) {
	const email = auth.address(`member.${role}.${Math.random().toString(36).slice(2, 8)}`);
	expect(
		(await auth.admin.post('/users?/invite', { email, name: `Member ${role}`, role })).status
	).toBe(200);
	const link = linkIn((await waitForMessage({ to: email })).text);
	const client = auth.client();
	await client.post(
		link,
		{ password: 'member passphrase', confirm: 'member passphrase' },
		{ headers: { [appEnv.ADDRESS_HEADER]: '192.0.2.40' } }
	);
	const who = await me(client);
	expect(who.status).toBe(200);
	return { client, id: who.body.user.id, email };
}

describe('API tokens', () => {
	it.each(DEMO_ROLE_SCOPES)(
		'the demo %s token carries all of its role’s scopes',
		async (role, scopes) => {
			const { status, body } = await bearer(`hr_demo_${role}`);
			expect(status).toBe(200);
			expect(body.user.role).toBe(role);
			expect(body.scopes).toEqual(scopes);
		}
	);

	it('answers 401 in the contract shape for unknown, malformed and missing tokens', async () => {
		for (const header of [
			'Bearer hr_not_a_token',
			'Bearer ',
			'Basic dXNlcjpwYXNz',
			'Bearer demo_viewer'
		]) {
			const response = await fetch(`${auth.app.url}/api/me`, {
				headers: { authorization: header }
			});
			expect(response.status).toBe(401);
			expect(await response.json()).toEqual({
				error: { code: 'unauthenticated', message: expect.any(String) }
			});
		}
		// A wrong token is refused even where anonymous callers are welcome.
		expect(
			(await fetch(`${auth.app.url}/api/health`, { headers: { authorization: 'Bearer hr_wrong' } }))
				.status
		).toBe(401);
	});

	it('shows a new value once, stores only its hash, and it works at once', async () => {
		const { client, id } = await newMember('engineer');
		const created = await createToken(client, 'CI pipeline', ['read', 'upload']);
		expect(created.status).toBe(200);
		expect(created.value).toMatch(/^hr_[\w-]{40,}$/);
		const [row] = await auth.sql(
			`select token_hash, hint, scopes from api_token where owner_id = ?`,
			[id]
		);
		expect(row.token_hash).toMatch(/^[0-9a-f]{64}$/);
		expect(JSON.stringify(row)).not.toContain(created.value!.slice(8));
		expect(row.scopes).toEqual(['read', 'upload']);

		const page = await (await client.get('/settings/tokens')).text();
		expect(page).toContain('CI pipeline');
		expect(page).not.toContain(created.value!);
		const { body } = await bearer(created.value!);
		expect(body.scopes).toEqual(['read', 'upload']);
	});

	it('keeps a token within the scopes chosen and within what the role allows', async () => {
		const { client } = await newMember('viewer');
		const refused = await createToken(client, 'too much', ['read', 'upload']);
		expect(refused.status).toBe(403);
		expect(refused.value).toBeUndefined();
		expect(refused.html).toContain('cannot grant the upload scope');

		const engineer = await newMember('engineer');
		const readOnly = await createToken(engineer.client, 'dashboards', ['read']);
		expect((await bearer(readOnly.value!)).body.scopes).toEqual(['read']);
	});

	it('shows when a token was last used, and refuses it once revoked', async () => {
		const { client, id } = await newMember('lead');
		const { value } = await createToken(client, 'revoke me', ['read']);
		const [{ id: tokenId, last_used_at: before }] = await auth.sql(
			`select id, last_used_at from api_token where owner_id = ?`,
			[id]
		);
		expect(before).toBeNull();
		expect((await bearer(value!)).status).toBe(200);
		const [{ last_used_at: after }] = await auth.sql(
			`select last_used_at from api_token where id = ?`,
			[tokenId]
		);
		expect(after).not.toBeNull();
		const page = await (await client.get('/settings/tokens')).text();
		const tokenRow = page.split('<tr').find((row) => row.includes('revoke me'))!;
		expect(tokenRow).toMatch(/\d{4}-\d\d-\d\d \d\d:\d\d UTC<\/td>\s*<td/);
		expect(tokenRow).not.toContain('>never<');

		expect((await client.post('/settings/tokens?/revoke', { tokenId })).status).toBe(303);
		expect((await bearer(value!)).status).toBe(401);
		// Someone else's token cannot be revoked through one's own page.
		const other = await newMember('engineer');
		const foreign = await createToken(other.client, 'not yours', ['read']);
		const [{ id: foreignId }] = await auth.sql(`select id from api_token where owner_id = ?`, [
			other.id
		]);
		expect((await client.post('/settings/tokens?/revoke', { tokenId: foreignId })).status).toBe(
			404
		);
		expect((await bearer(foreign.value!)).status).toBe(200);
	});
});

describe('roles and deactivation take effect on the next request', () => {
	it('a role change narrows a live session and the owner’s tokens at once', async () => {
		const { client, id } = await newMember('engineer');
		const { value } = await createToken(client, 'uploader', ['read', 'upload']);
		expect((await me(client)).body.scopes).toEqual(['read', 'upload']);
		expect((await auth.admin.post('/users?/role', { userId: id, role: 'viewer' })).status).toBe(
			303
		);
		expect((await me(client)).body).toMatchObject({ user: { role: 'viewer' }, scopes: ['read'] });
		expect((await bearer(value!)).body.scopes).toEqual(['read']);
		const [audit] = await auth.sql(
			`select before, after from audit_event where action = 'user.role_changed' and entity_id = ?`,
			[id]
		);
		expect(audit).toMatchObject({ before: { role: 'engineer' }, after: { role: 'viewer' } });
	});

	it('deactivation cuts the live session and every token; reactivation needs a new sign-in', async () => {
		const { client, id, email } = await newMember('lead');
		const { value } = await createToken(client, 'pipeline', ['read']);
		expect((await auth.admin.post('/users?/deactivate', { userId: id })).status).toBe(303);
		expect((await me(client)).status).toBe(401);
		expect((await client.request('/settings/tokens')).status).toBe(303);
		expect((await bearer(value!)).status).toBe(401);
		const list = await (await auth.admin.get('/users')).text();
		expect(list).toMatch(new RegExp(`${email.replace(/\./g, '\\.')}[\\s\\S]*?deactivated`));

		expect((await auth.admin.post('/users?/reactivate', { userId: id })).status).toBe(303);
		// The old cookie stays void (it might have been taken); tokens work again.
		expect((await me(client)).status).toBe(401);
		expect((await bearer(value!)).status).toBe(200);
		const actions = (
			await auth.sql(`select action from audit_event where entity_id = ? order by id`, [id])
		).map((r) => r.action as string);
		expect(actions).toEqual([
			'user.invited',
			'user.invitation_accepted',
			'user.deactivated',
			'user.reactivated'
		]);
	});

	it('never leaves Headroom without an active admin, and admins cannot deactivate themselves', async () => {
		const [{ id: adminId }] = await auth.sql(
			`select id from app_user where email = 'admin@headroom.test'`
		);
		const self = await auth.admin.post('/users?/deactivate', { userId: adminId });
		expect(self.status).toBe(409);
		const demote = await auth.admin.post('/users?/role', { userId: adminId, role: 'lead' });
		expect(demote.status).toBe(409);
		expect(await demote.text()).toContain('at least one active admin');
		expect((await me(auth.admin)).body.user.role).toBe('admin');
	});

	it('lets only admins use the users page and its actions', async () => {
		const lead = auth.client();
		await signIn(lead, 'lead@headroom.test');
		expect((await lead.request('/users')).status).toBe(403);
		const [{ id }] = await auth.sql(`select id from app_user where email = 'viewer@headroom.test'`);
		expect((await lead.post('/users?/role', { userId: id, role: 'admin' })).status).toBe(403);
		expect(
			(await lead.post('/users?/invite', { email: auth.address('x'), role: 'admin' })).status
		).toBe(403);
		const [{ role }] = await auth.sql(`select role from app_user where id = ?`, [id]);
		expect(role).toBe('viewer');
	});
});

describe('audit trail', () => {
	it('is insert-only in the database itself', async () => {
		await expect(auth.sql(`update audit_event set action = 'rewritten'`)).rejects.toThrow(
			/insert-only/
		);
		await expect(auth.sql(`delete from audit_event`)).rejects.toThrow(/insert-only/);
		await expect(auth.sql(`truncate audit_event`)).rejects.toThrow(/insert-only/);
	});
});
