/** Steps the auth tests share: signing in the way the /signin form does, reading /api/me. */
import { expect } from 'vitest';
import type { HttpClient } from '../support/http-client';

/** The app under test reads the client address from this header (ADDRESS_HEADER). */
export const ADDRESS_HEADER = 'x-test-client-address';
export const appEnv = { ADDRESS_HEADER };

export const DEMO_PASSWORD = 'headroom-demo';

export async function postSignIn(
	client: HttpClient,
	email: string,
	password: string,
	{ next = '/', address = '192.0.2.1' }: { next?: string; address?: string } = {}
): Promise<Response> {
	return client.post('/signin?/password', { email, password, next }, { headers: { [ADDRESS_HEADER]: address } });
}

/** Signs in and checks it worked: 303 to `next` and a session cookie. */
export async function signIn(client: HttpClient, email: string, password = DEMO_PASSWORD, next = '/') {
	const response = await postSignIn(client, email, password, { next });
	expect(response.status, await response.clone().text()).toBe(303);
	expect(response.headers.get('location')).toBe(next);
	expect(client.cookie('authjs.session-token')).toBeDefined();
}

export interface Me {
	user: { id: string; email: string; name: string; role: string };
	scopes: string[];
}

export async function me(client: HttpClient, token?: string): Promise<{ status: number; body: Me & { error?: { code: string; message: string } } }> {
	const { status, body } = await client.api('/api/me', token);
	return { status, body: body as Me & { error?: { code: string; message: string } } };
}

/** The set-password link in an invitation or reset e-mail. */
export function linkIn(text: string | undefined): string {
	const match = /https?:\/\/[^\s]+\/reset\/[\w-]+/.exec(text ?? '');
	if (!match) throw new Error(`no link in the message:\n${text}`);
	return match[0];
}

/**
 * Single sign-on the way a person does it: the SSO button, the IdP's login form, back to the
 * app. Returns the final answer; client.lastUrl says where it landed.
 */
export async function ssoSignIn(client: HttpClient, email: string, password: string, next = '/'): Promise<Response> {
	const start = await client.post('/signin?/sso', { next });
	expect(start.status, await start.clone().text()).toBe(303);
	const loginPage = await client.follow(start, '/signin?/sso');
	expect(loginPage.status).toBe(200);
	const html = await loginPage.text();
	const action = /<form method="post" action="([^"]+)"/.exec(html)?.[1];
	if (!action) throw new Error(`no login form at ${client.lastUrl}:\n${html}`);
	const loginUrl = new URL(action, client.lastUrl).href;
	const submitted = await client.post(loginUrl, { email, password });
	return client.follow(submitted, loginUrl);
}
