/**
 * The set-up every auth test file shares: the built app with the demo data on a database of its
 * own, started before the file's tests and stopped after them, optionally with the demo admin
 * signed in, plus SQL against that database and e-mail addresses unique to this run.
 *
 *   const auth = useAuthApp('auth_links', { signInAdmin: true });
 *   it('…', async () => { await auth.admin.post(…); const client = auth.client(); … });
 */
import type { AnyEntity, EntityData } from '@mikro-orm/core';
import { afterAll, beforeAll } from 'vitest';
import {
	BUILD_TIMEOUT_MS,
	startBuiltApp,
	type BuiltApp,
	type BuiltAppOptions
} from '../support/built-app';
import { HttpClient } from '../support/http-client';
import { appEnv, signIn } from './flows';

/** Each demo role and the scopes its session and its API token must carry (written out, not derived). */
export const DEMO_ROLE_SCOPES: [string, string[]][] = [
	['viewer', ['read']],
	['engineer', ['read', 'upload']],
	['lead', ['read', 'upload']],
	['admin', ['read', 'upload']]
];

export interface AuthAppOptions {
	/** Sign the demo admin in once, as `admin`. */
	signInAdmin?: boolean;
	/** Runs first (e.g. to start an identity provider); may choose the port and add environment. */
	before?: () => Promise<Pick<BuiltAppOptions, 'port' | 'env'>>;
	/** Runs after the app has stopped. */
	after?: () => Promise<void>;
}

export interface AuthApp {
	readonly app: BuiltApp;
	/** The demo admin's signed-in client (with `signInAdmin`). */
	readonly admin: HttpClient;
	/** A client with no cookies yet. */
	client(): HttpClient;
	sql(query: string, params?: unknown[]): Promise<EntityData<AnyEntity>[]>;
	/**
	 * `who.<run>@example.test`: the mail fake is shared by every test file, so addresses unique
	 * to this run pick out our messages.
	 */
	address(who: string): string;
}

export function useAuthApp(prefix: string, options: AuthAppOptions = {}): AuthApp {
	let app: BuiltApp | undefined;
	let admin: HttpClient | undefined;
	const run = Math.random().toString(36).slice(2, 8);
	const started = () => {
		if (!app) throw new Error(`the ${prefix} app has not started`);
		return app;
	};

	beforeAll(async () => {
		const extra = (await options.before?.()) ?? {};
		app = await startBuiltApp({
			prefix,
			seed: true,
			port: extra.port,
			env: { ...appEnv, ...extra.env }
		});
		if (options.signInAdmin) {
			admin = new HttpClient(app.url);
			await signIn(admin, 'admin@headroom.test');
		}
	}, BUILD_TIMEOUT_MS);
	afterAll(async () => {
		await app?.stop();
		await options.after?.();
	});

	return {
		get app() {
			return started();
		},
		get admin() {
			if (!admin) throw new Error('useAuthApp: pass signInAdmin to sign the admin in');
			return admin;
		},
		client: () => new HttpClient(started().url),
		sql: (query, params = []) => started().orm.em.getConnection().execute(query, params),
		address: (who) => `${who}.${run}@example.test`
	};
}
