// The app's own processes and the environment contract they read. Shared by `npm start` and
// the e2e stage of `npm test`, so both run the app exactly the same way.
import { join } from 'node:path';
import { HOST } from './ports';
import { mailEnv } from './mail';
import type { ChildSpec } from './processes';
import { s3Env } from './s3';

export type AppPart = 'migrate' | 'seed' | 'worker' | 'web' | 'build';

/**
 * Shell commands that replace a part, for trying the launcher before the app exists or with a
 * stand-in (HEADROOM_WEB_CMD='node /tmp/fake-web.mjs', HEADROOM_BUILD_CMD=true to skip builds).
 */
export const OVERRIDES: Record<AppPart, string> = {
	migrate: 'HEADROOM_MIGRATE_CMD',
	seed: 'HEADROOM_SEED_CMD',
	worker: 'HEADROOM_WORKER_CMD',
	web: 'HEADROOM_WEB_CMD',
	build: 'HEADROOM_BUILD_CMD'
};

export const override = (part: AppPart) => process.env[OVERRIDES[part]] || undefined;

const SCRIPTS: Record<Exclude<AppPart, 'web' | 'build'>, string> = {
	migrate: 'scripts/db-migrate.ts',
	seed: 'scripts/db-seed.ts',
	worker: 'scripts/worker.ts'
};

/** `buildDir`: where the web server's adapter-node output is (default `<root>/build`). */
export function appProcess(
	root: string,
	part: Exclude<AppPart, 'build'>,
	env: NodeJS.ProcessEnv,
	{ name = part, buildDir = join(root, 'build') }: { name?: string; buildDir?: string } = {}
): ChildSpec {
	const custom = override(part);
	if (custom) return { name, command: custom, shell: true, cwd: root, env };
	if (part === 'web') {
		// adapter-node waits SHUTDOWN_TIMEOUT (30 s by default) for open connections on SIGTERM;
		// a local stop should not hang on a browser's keep-alive socket that long.
		return {
			name,
			command: process.execPath,
			args: [buildDir],
			cwd: root,
			env: { SHUTDOWN_TIMEOUT: '5', ...env }
		};
	}
	// node with tsx's loader: one process per part, so signals reach the script itself.
	return {
		name,
		command: process.execPath,
		args: ['--import', 'tsx', join(root, SCRIPTS[part])],
		cwd: root,
		env
	};
}

export interface AppEnvInput {
	databaseUrl: string;
	s3Port: number;
	bucket: string;
	smtpPort: number;
	mailWebPort: number;
	webPort: number;
	authSecret: string;
	storageEventsSecret: string;
	nodeEnv: string;
}

/** Everything the app reads, on top of the caller's environment. */
export function appEnv(input: AppEnvInput): NodeJS.ProcessEnv {
	return {
		...process.env,
		DATABASE_URL: input.databaseUrl,
		...s3Env(input.s3Port, input.bucket),
		...mailEnv(input.smtpPort, input.mailWebPort),
		PORT: String(input.webPort),
		HOST,
		ORIGIN: `http://${HOST}:${input.webPort}`,
		// adapter-node refuses bodies over 512 kB by default; model uploads go up to 5 MB.
		BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT || '6M',
		AUTH_SECRET: input.authSecret,
		STORAGE_EVENTS_SECRET: input.storageEventsSecret,
		NODE_ENV: input.nodeEnv
	};
}

export const storageEventsUrl = (webPort: number) => `http://${HOST}:${webPort}/api/storage-events`;
