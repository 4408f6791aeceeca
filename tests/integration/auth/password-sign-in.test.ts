import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD, me, postSignIn, signIn } from './flows';
import { DEMO_ROLE_SCOPES, useAuthApp } from './support';

const auth = useAuthApp('auth_password');

describe('password sign-in', () => {
	it.each(DEMO_ROLE_SCOPES)(
		'signs the demo %s in with the role and scopes from our tables',
		async (role, scopes) => {
			const client = auth.client();
			await signIn(client, `${role}@headroom.test`);
			const { status, body } = await me(client);
			expect(status).toBe(200);
			expect(body.user).toMatchObject({ email: `${role}@headroom.test`, role });
			expect(body.scopes).toEqual(scopes);
		}
	);

	it('keeps only our user id in the session cookie and sets its flags', async () => {
		const client = auth.client();
		await signIn(client, 'lead@headroom.test');
		const cookie = client.cookie('authjs.session-token')!;
		expect(cookie.attributes).toMatch(/HttpOnly/i);
		expect(cookie.attributes).toMatch(/SameSite=Lax/i);
		expect(cookie.attributes).toMatch(/Path=\//i);
		// Plain http here (ORIGIN http://…): a Secure cookie would be dropped by the browser.
		expect(cookie.attributes).not.toMatch(/Secure/i);
		// The cookie is encrypted (JWE): neither the e-mail nor the role can be read from it.
		expect(cookie.value.split('.')).toHaveLength(5);
		expect(cookie.value).not.toContain('lead');
	});

	it('records the time of the last sign-in', async () => {
		const before = Date.now();
		await signIn(auth.client(), 'engineer@headroom.test');
		const [row] = await auth.sql(
			`select last_sign_in_at from app_user where email = 'engineer@headroom.test'`
		);
		expect(new Date(row.last_sign_in_at).getTime()).toBeGreaterThanOrEqual(before - 1000);
	});

	it('returns to the page asked for, but never to another site', async () => {
		const client = auth.client();
		const response = await postSignIn(client, 'viewer@headroom.test', DEMO_PASSWORD, {
			next: '/settings/tokens'
		});
		expect(response.headers.get('location')).toBe('/settings/tokens');
		for (const next of ['//evil.test/x', 'https://evil.test/', '/\\evil.test']) {
			const other = auth.client();
			const answer = await postSignIn(other, 'viewer@headroom.test', DEMO_PASSWORD, { next });
			expect(answer.headers.get('location')).toBe('/');
		}
	});

	it('answers a wrong password without echoing it, keeping the e-mail typed', async () => {
		const client = auth.client();
		const response = await postSignIn(client, 'viewer@headroom.test', 'not-the-password-42');
		expect(response.status).toBe(400);
		const html = await response.text();
		expect(html).toContain('do not match an active account');
		expect(html).toContain('viewer@headroom.test');
		expect(html).not.toContain('not-the-password-42');
		expect(client.cookie('authjs.session-token')).toBeUndefined();
	});

	it('signs out: the cookie is dropped and the API answers 401', async () => {
		const client = auth.client();
		await signIn(client, 'viewer@headroom.test');
		const response = await client.post('/signout', {});
		expect(response.status).toBe(303);
		expect(response.headers.get('location')).toBe('/signin?signedOut=1');
		expect(client.cookie('authjs.session-token')).toBeUndefined();
		expect((await me(client)).status).toBe(401);
	});

	it('refuses a sign-in form posted from another origin (SvelteKit CSRF check)', async () => {
		const client = auth.client();
		const response = await client.post(
			'/signin?/password',
			{ email: 'admin@headroom.test', password: DEMO_PASSWORD, next: '/' },
			{ headers: { origin: 'https://evil.test', 'x-test-client-address': '192.0.2.9' } }
		);
		expect(response.status).toBe(403);
		expect(client.cookie('authjs.session-token')).toBeUndefined();
	});

	it('sends pages to /signin with the way back, and API calls a 401 in the contract shape', async () => {
		const client = auth.client();
		const page = await client.request('/settings/tokens?tab=1');
		expect(page.status).toBe(303);
		expect(page.headers.get('location')).toBe('/signin?next=%2Fsettings%2Ftokens%3Ftab%3D1');
		const api = await me(client);
		expect(api.status).toBe(401);
		expect(api.body).toEqual({ error: { code: 'unauthenticated', message: expect.any(String) } });
	});

	it('answers 403 when the role is not enough', async () => {
		const client = auth.client();
		await signIn(client, 'lead@headroom.test');
		const response = await client.request('/users');
		expect(response.status).toBe(403);
		expect(await response.text()).toContain('admin role');
	});
});
