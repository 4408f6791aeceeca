import { describe, expect, it } from 'vitest';
import { freePort, HOST } from '../../../scripts/lib/ports';
import { startOidcFake, type OidcFake } from '../../../scripts/lib/oidc';
import { waitForMessage } from '../support/mail';
import { me, ssoSignIn } from './flows';
import { useAuthApp } from './support';

let idp: OidcFake;
const PASSWORD = 'idp-password';
const auth = useAuthApp('auth_sso', {
	signInAdmin: true,
	async before() {
		const port = await freePort();
		idp = await startOidcFake({
			port: 0,
			clientId: 'headroom-test',
			clientSecret: 'test-client-secret',
			redirectUri: `http://${HOST}:${port}/auth/callback/oidc`,
			users: [
				{ sub: 'sub-newcomer', email: people.newcomer, name: 'Nora Newcomer', password: PASSWORD },
				{
					sub: 'sub-invited',
					email: people.invited.toUpperCase(),
					name: 'Ivo Invited',
					password: PASSWORD
				},
				{
					sub: 'sub-unverified',
					email: people.unverified,
					name: 'Una Unverified',
					password: PASSWORD,
					emailVerified: false
				},
				{ sub: 'sub-leaver', email: people.leaver, name: 'Leo Leaver', password: PASSWORD },
				{ sub: 'sub-lead', email: 'lead@headroom.test', name: 'Lena (IdP)', password: PASSWORD }
			]
		});
		return {
			port,
			env: {
				OIDC_ISSUER: idp.issuer,
				OIDC_CLIENT_ID: 'headroom-test',
				OIDC_CLIENT_SECRET: 'test-client-secret',
				OIDC_NAME: 'Test IdP'
			}
		};
	},
	after: async () => {
		await idp?.stop();
	}
});
const people = {
	newcomer: auth.address('newcomer'),
	invited: auth.address('invited'),
	unverified: auth.address('unverified'),
	leaver: auth.address('leaver')
};

describe('single sign-on (OpenID Connect)', () => {
	it('offers the provider on the sign-in page by its configured name', async () => {
		const page = await auth.client().get('/signin');
		expect(await page.text()).toContain('Sign in with Test IdP');
	});

	it('creates a viewer on the first sign-in and lands on the page asked for', async () => {
		const client = auth.client();
		const landed = await ssoSignIn(client, people.newcomer, PASSWORD, '/settings/tokens');
		expect(landed.status).toBe(200);
		expect(new URL(client.lastUrl).pathname).toBe('/settings/tokens');
		// The callback went through Auth.js at /auth/callback/oidc.
		expect(client.hops.some((h) => h.url.includes('/auth/callback/oidc'))).toBe(true);
		const who = await me(client);
		expect(who.body.user).toMatchObject({
			email: people.newcomer,
			name: 'Nora Newcomer',
			role: 'viewer'
		});
		expect(who.body.scopes).toEqual(['read']);
		const [audit] = await auth.sql(
			`select action, actor_id, after from audit_event where entity_id = ?`,
			[who.body.user.id]
		);
		expect(audit).toMatchObject({ action: 'user.created_by_sso', actor_id: who.body.user.id });
		expect(audit.after).toMatchObject({ email: people.newcomer, role: 'viewer' });
	});

	it('finds the same account on the next sign-in (no duplicate)', async () => {
		const client = auth.client();
		await ssoSignIn(client, people.newcomer, PASSWORD);
		const [{ count }] = await auth.sql(
			`select count(*)::int as count from app_user where email = ?`,
			[people.newcomer]
		);
		expect(count).toBe(1);
		expect((await me(client)).body.user.email).toBe(people.newcomer);
	});

	it('gives an invited address the role the admin chose, matching e-mails case-blind', async () => {
		const invited = await auth.admin.post('/users?/invite', {
			email: people.invited,
			name: 'Ivo',
			role: 'lead'
		});
		expect(invited.status).toBe(200);
		await waitForMessage({ to: people.invited });
		const client = auth.client();
		await ssoSignIn(client, people.invited, PASSWORD);
		const who = await me(client);
		expect(who.body.user).toMatchObject({ email: people.invited, role: 'lead' });
		expect(who.body.scopes).toEqual(['read', 'upload']);
	});

	it('signs an existing password user in to the same account', async () => {
		const client = auth.client();
		await ssoSignIn(client, 'lead@headroom.test', PASSWORD);
		expect((await me(client)).body.user).toMatchObject({
			email: 'lead@headroom.test',
			role: 'lead',
			name: 'Lena Lead'
		});
	});

	it('refuses an address the IdP has not verified', async () => {
		const client = auth.client();
		await ssoSignIn(client, people.unverified, PASSWORD);
		expect(client.lastUrl).toContain('/signin?error=AccessDenied');
		expect((await me(client)).status).toBe(401);
		const [{ count }] = await auth.sql(
			`select count(*)::int as count from app_user where email = ?`,
			[people.unverified]
		);
		expect(count).toBe(0);
	});

	it('refuses a deactivated account and cuts its live session at once', async () => {
		const client = auth.client();
		await ssoSignIn(client, people.leaver, PASSWORD);
		const who = await me(client);
		expect(who.status).toBe(200);
		expect((await auth.admin.post('/users?/deactivate', { userId: who.body.user.id })).status).toBe(
			303
		);
		expect((await me(client)).status).toBe(401);

		const again = auth.client();
		const landed = await ssoSignIn(again, people.leaver, PASSWORD);
		expect(again.lastUrl).toContain('/signin?error=AccessDenied');
		expect(await landed.text()).toContain('may not use Headroom');
		expect((await me(again)).status).toBe(401);
	});
});
