/**
 * The real app (`node build`, production mode) on a free loopback port and a database of its
 * own, for tests that need the whole HTTP stack: hooks, Auth.js, form actions, cookies.
 *
 *   const app = await startBuiltApp({ prefix: 'tokens', seed: true });
 *   afterAll(() => app.stop());
 *
 * Builds first when build/ is older than the sources (a fresh checkout, or after edits), so the
 * suite never tests stale code. Give the beforeAll hook BUILD_TIMEOUT_MS.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { resolve } from 'node:path';
import { MikroORM } from '@mikro-orm/postgresql';
import { staleReason } from '../../../scripts/lib/build';
import { freePort, HOST } from '../../../scripts/lib/ports';
import { ormOptions } from '../../../src/lib/server/db/options';
import { migrate } from '../../../src/lib/server/db/orm';
import { seedDemo } from '../../../src/lib/server/seed/demo';
import { createTestDatabase, type TestDatabase } from './db';
import { testEnv } from './env';

export const BUILD_TIMEOUT_MS = 240_000;
const root = resolve(import.meta.dirname, '../../..');

export interface BuiltApp {
	url: string;
	db: TestDatabase;
	/** Run SQL against the app's database (checks and fixtures a page cannot reach). */
	orm: MikroORM;
	/** Everything the server printed, for failure messages. */
	log(): string;
	stop(): Promise<void>;
}

export interface BuiltAppOptions {
	prefix: string;
	seed?: boolean;
	/** A port chosen beforehand (e.g. to register the callback URL with an OIDC fake); else a free one. */
	port?: number;
	/** Added to (or, with undefined, removed from) the server's environment. */
	env?: Record<string, string | undefined>;
}

export function ensureBuilt(): void {
	const reason = staleReason(root);
	if (!reason) return;
	// vite takes its mode from NODE_ENV; vitest sets "test", which would not give a production bundle.
	const { NODE_ENV: _mode, ...env } = process.env;
	const result = spawnSync('npx', ['vite', 'build'], { cwd: root, env, encoding: 'utf8' });
	if (result.status !== 0) throw new Error(`vite build failed (${reason}):\n${result.stdout}\n${result.stderr}`);
}

export function serverEnv(port: number, databaseUrl: string, extra: BuiltAppOptions['env'] = {}) {
	const env: Record<string, string | undefined> = {
		PATH: process.env.PATH,
		NODE_ENV: 'production',
		HOST,
		PORT: String(port),
		ORIGIN: `http://${HOST}:${port}`,
		DATABASE_URL: databaseUrl,
		AUTH_SECRET: testEnv.authSecret,
		SMTP_URL: testEnv.smtpUrl,
		MAIL_FROM: testEnv.mailFrom,
		S3_ENDPOINT: testEnv.s3.endpoint,
		S3_REGION: testEnv.s3.region,
		S3_BUCKET: testEnv.s3.bucket,
		S3_ACCESS_KEY_ID: testEnv.s3.accessKeyId,
		S3_SECRET_ACCESS_KEY: testEnv.s3.secretAccessKey,
		STORAGE_EVENTS_SECRET: testEnv.storageEventsSecret,
		SHUTDOWN_TIMEOUT: '2',
		...extra
	};
	return Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined)) as Record<string, string>;
}

async function waitUntilServing(url: string, child: ChildProcess, log: () => string): Promise<void> {
	const deadline = Date.now() + 30_000;
	for (;;) {
		if (child.exitCode !== null) throw new Error(`node build exited (${child.exitCode}):\n${log()}`);
		try {
			const response = await fetch(`${url}/signin`, { redirect: 'manual' });
			if (response.status < 500) return;
		} catch {
			// Not listening yet.
		}
		if (Date.now() > deadline) throw new Error(`node build did not answer at ${url}:\n${log()}`);
		await new Promise((r) => setTimeout(r, 200));
	}
}

export async function startBuiltApp(options: BuiltAppOptions): Promise<BuiltApp> {
	ensureBuilt();
	const db = await createTestDatabase(options.prefix);
	const orm = await MikroORM.init(ormOptions(db.url, { pool: { min: 0, max: 2 } }));
	await migrate(orm);
	if (options.seed) await seedDemo(orm.em.fork());
	const port = options.port ?? (await freePort());
	const url = `http://${HOST}:${port}`;
	let output = '';
	const child = spawn(process.execPath, [resolve(root, 'build')], {
		cwd: root,
		env: serverEnv(port, db.url, options.env),
		stdio: ['ignore', 'pipe', 'pipe']
	});
	child.stdout?.on('data', (d) => (output += d));
	child.stderr?.on('data', (d) => (output += d));
	const log = () => output;
	await waitUntilServing(url, child, log);
	return {
		url,
		db,
		orm,
		log,
		async stop() {
			if (child.exitCode === null) {
				const exited = new Promise((r) => child.once('exit', r));
				child.kill('SIGTERM');
				await exited;
			}
			await orm.close(true);
			await db.drop();
		}
	};
}
