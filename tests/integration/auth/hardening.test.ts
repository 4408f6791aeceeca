import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { resolve } from 'node:path';
import { freePort } from '../../../scripts/lib/ports';
import { BUILD_TIMEOUT_MS, ensureBuilt, serverEnv, startBuiltApp } from '../support/built-app';
import { HttpClient } from '../support/http-client';
import { appEnv, DEMO_PASSWORD, me, postSignIn } from './flows';
import { useAuthApp } from './support';

const auth = useAuthApp('auth_hardening');

const LIMITED = 'Too many sign-in attempts';
const INVALID = 'do not match an active account';

/** Median time of `n` sign-in attempts, in ms. */
async function medianMs(n: number, attempt: (i: number) => Promise<Response>): Promise<number> {
	const times: number[] = [];
	for (let i = 0; i < n; i++) {
		const started = performance.now();
		await (await attempt(i)).text();
		times.push(performance.now() - started);
	}
	return times.sort((a, b) => a - b)[Math.floor(n / 2)];
}

describe('no enumeration of accounts', () => {
	it('answers an unknown address exactly like a wrong password, in about the same time', async () => {
		const client = () => auth.client();
		const known = await postSignIn(client(), 'lead@headroom.test', 'wrong password 1', {
			address: '198.51.100.1'
		});
		const unknown = await postSignIn(client(), 'nobody@headroom.test', 'wrong password 1', {
			address: '198.51.100.2'
		});
		expect(known.status).toBe(400);
		expect(unknown.status).toBe(400);
		const strip = (html: string, email: string) =>
			html.replaceAll(email, 'EMAIL').replace(/formsnap-\d+/g, 'formsnap-N');
		expect(strip(await unknown.text(), 'nobody@headroom.test')).toBe(
			strip(await known.text(), 'lead@headroom.test')
		);

		// Both pay for one argon2 verification; without the decoy hash the unknown address would
		// answer in a few milliseconds. Distinct addresses and accounts keep the limits out of it.
		const knownMs = await medianMs(5, (i) =>
			postSignIn(client(), 'engineer@headroom.test', `wrong ${i}`, {
				address: `198.51.100.${10 + i}`
			})
		);
		const unknownMs = await medianMs(5, (i) =>
			postSignIn(client(), `ghost${i}@headroom.test`, `wrong ${i}`, {
				address: `198.51.100.${20 + i}`
			})
		);
		expect(unknownMs).toBeGreaterThan(knownMs * 0.6);
		expect(unknownMs).toBeLessThan(knownMs * 1.6);
	});
});

describe('sign-in rate limiting (kept in PostgreSQL)', () => {
	it('locks an account after five failures, even for the right password, whatever the address', async () => {
		for (let i = 0; i < 5; i++) {
			const response = await postSignIn(auth.client(), 'viewer@headroom.test', `guess ${i}`, {
				address: `203.0.113.${i + 1}`
			});
			expect(await response.text()).toContain(INVALID);
		}
		const right = await postSignIn(auth.client(), 'viewer@headroom.test', DEMO_PASSWORD, {
			address: '203.0.113.99'
		});
		expect(right.status).toBe(429);
		expect(await right.text()).toContain(LIMITED);
		// Other accounts are not affected.
		expect(
			(
				await postSignIn(auth.client(), 'lead@headroom.test', DEMO_PASSWORD, {
					address: '203.0.113.99'
				})
			).status
		).toBe(303);
		// Counted in the database, where every replica sees it.
		const [{ count }] = await auth.sql(
			`select count(*)::int as count from sign_in_attempt where email = 'viewer@headroom.test' and not succeeded`
		);
		expect(count).toBe(6);
	});

	it('limits unknown addresses the same way, so the limit reveals nothing either', async () => {
		const answers: number[] = [];
		for (let i = 0; i < 6; i++) {
			answers.push(
				(
					await postSignIn(auth.client(), 'nobody-at-all@headroom.test', `guess ${i}`, {
						address: `203.0.114.${i + 1}`
					})
				).status
			);
		}
		expect(answers).toEqual([400, 400, 400, 400, 400, 429]);
	});

	it('forgets failures once the window has passed', async () => {
		await auth.sql(
			`update sign_in_attempt set at = at - interval '16 minutes' where email = 'viewer@headroom.test'`
		);
		expect(
			(
				await postSignIn(auth.client(), 'viewer@headroom.test', DEMO_PASSWORD, {
					address: '203.0.113.100'
				})
			).status
		).toBe(303);
	});

	it('limits one client address trying many accounts', async () => {
		const address = '203.0.115.7';
		for (let i = 0; i < 30; i++) {
			const response = await postSignIn(auth.client(), `spray${i}@headroom.test`, 'Winter2026!', {
				address
			});
			expect(response.status).toBe(400);
		}
		const next = await postSignIn(auth.client(), 'admin@headroom.test', DEMO_PASSWORD, { address });
		expect(next.status).toBe(429);
		// A colleague elsewhere signs in as usual.
		expect(
			(
				await postSignIn(auth.client(), 'admin@headroom.test', DEMO_PASSWORD, {
					address: '203.0.115.8'
				})
			).status
		).toBe(303);
	});
});

describe('configuration hardening', () => {
	it(
		'refuses to start in production without AUTH_SECRET',
		async () => {
			ensureBuilt();
			const port = await freePort();
			const env = serverEnv(port, auth.app.db.url, { AUTH_SECRET: undefined });
			const child = spawn(process.execPath, [resolve(import.meta.dirname, '../../../build')], {
				env,
				stdio: ['ignore', 'pipe', 'pipe']
			});
			let output = '';
			child.stdout.on('data', (d) => (output += d));
			child.stderr.on('data', (d) => (output += d));
			const code = await new Promise<number | null>((r) => child.once('exit', r));
			expect(code).not.toBe(0);
			expect(output).toContain('AUTH_SECRET is not set');
		},
		BUILD_TIMEOUT_MS
	);

	it(
		'uses __Secure- cookies with the Secure flag when users reach it over https',
		async () => {
			const secure = await startBuiltApp({
				prefix: 'auth_https',
				seed: true,
				env: { ...appEnv, ORIGIN: 'https://headroom.example.test' }
			});
			try {
				// Behind a TLS-terminating proxy the app itself still listens on plain http.
				const client = new HttpClient(secure.url);
				const response = await client.post(
					'/signin?/password',
					{ email: 'viewer@headroom.test', password: DEMO_PASSWORD, next: '/' },
					{
						headers: {
							origin: 'https://headroom.example.test',
							[appEnv.ADDRESS_HEADER]: '192.0.2.50'
						}
					}
				);
				expect(response.status).toBe(303);
				const session = client.cookie('__Secure-authjs.session-token');
				expect(session?.attributes).toMatch(/Secure/);
				expect(session?.attributes).toMatch(/HttpOnly/);
				expect(client.cookie('authjs.session-token')).toBeUndefined();
				// And the cookie is accepted on the next request.
				expect((await me(client)).body.user.email).toBe('viewer@headroom.test');
			} finally {
				await secure.stop();
			}
		},
		BUILD_TIMEOUT_MS
	);
});
