// `npm start`: the whole product on this machine, on loopback only, with its data under
// HEADROOM_DATA_DIR (default .data) kept across restarts. Ctrl-C stops everything and exits 0;
// a service that dies on its own stops everything and exits 1.
//
// Settings (env): HEADROOM_DATA_DIR=.data, HEADROOM_PG_PORT=54329, HEADROOM_S3_PORT=4569,
// HEADROOM_SMTP_PORT=1025, HEADROOM_MAIL_WEB_PORT=1080, PORT=3000. Stand-ins for trying the
// launcher without the app: HEADROOM_{MIGRATE,SEED,BUILD,WORKER,WEB}_CMD (see lib/app.ts).
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { appEnv, appProcess, override, storageEventsUrl } from './lib/app';
import { buildIfStale } from './lib/build';
import { AlreadyRunningError, Lock } from './lib/lock';
import { bold, error, errorMessage, info } from './lib/log';
import { startMailFake } from './lib/mail';
import { assertPortsFree, HOST, parsePort } from './lib/ports';
import { startCluster } from './lib/postgres';
import { onParentGone, onSignals } from './lib/lifecycle';
import { describeExit, Supervisor } from './lib/processes';
import { startS3Fake } from './lib/s3';
import { persistentSecret, randomSecret } from './lib/secrets';
import { DEFAULT_OIDC_USERS, OIDC_FAKE_PASSWORD, startOidcFake } from './lib/oidc';
import { waitForHttp } from './lib/wait';

const root = resolve(import.meta.dirname, '..');
const dataDir = resolve(root, process.env.HEADROOM_DATA_DIR || '.data');
const ports = {
	pg: parsePort('HEADROOM_PG_PORT', 54329),
	s3: parsePort('HEADROOM_S3_PORT', 4569),
	smtp: parsePort('HEADROOM_SMTP_PORT', 1025),
	mailWeb: parsePort('HEADROOM_MAIL_WEB_PORT', 1080),
	web: parsePort('PORT', 3000),
	oidc: parsePort('HEADROOM_OIDC_PORT', 4580)
};
const appUrl = `http://${HOST}:${ports.web}`;
const inboxUrl = `http://${HOST}:${ports.mailWeb}`;
const BUCKET = 'headroom';
const DB = { role: 'headroom', password: 'headroom', database: 'headroom' };

mkdirSync(dataDir, { recursive: true });
let lock: Lock;
try {
	lock = new Lock(join(dataDir, 'headroom.lock'), appUrl);
} catch (err) {
	console.error(
		err instanceof AlreadyRunningError ? err.message : `cannot take the lock: ${errorMessage(err)}`
	);
	process.exit(1);
}
process.on('exit', () => lock.release());

const supervisor = new Supervisor();
supervisor.onSpawn = (child) => lock.addGroup(child.pid);

let exitCode: number | undefined;
async function shutdown(code: number): Promise<void> {
	if (exitCode !== undefined) return;
	exitCode = code;
	await supervisor.stopAll();
	info(code === 0 ? 'Headroom stopped' : 'Headroom stopped after an error');
	process.exit(code);
}
onSignals(() => void shutdown(0));
onParentGone((pid) => {
	info(`the process that started Headroom (pid ${pid}) is gone: stopping`);
	void shutdown(0);
});
supervisor.onUnexpectedExit = (child, exit) => {
	error(`${child.name} exited unexpectedly (${describeExit(exit)}): stopping everything`);
	void shutdown(1);
};

async function up(): Promise<void> {
	await assertPortsFree([
		{ service: 'S3 fake', port: ports.s3, envVar: 'HEADROOM_S3_PORT' },
		{ service: 'SMTP fake', port: ports.smtp, envVar: 'HEADROOM_SMTP_PORT' },
		{ service: 'mail inbox', port: ports.mailWeb, envVar: 'HEADROOM_MAIL_WEB_PORT' },
		{ service: 'web server', port: ports.web, envVar: 'PORT' },
		{ service: 'OpenID provider fake', port: ports.oidc, envVar: 'HEADROOM_OIDC_PORT' }
	]);

	const pg = await startCluster({
		dataDir: join(dataDir, 'postgres'),
		port: ports.pg,
		logFile: join(dataDir, 'postgres.log'),
		superuserPassword: persistentSecret(join(dataDir, 'postgres-password'))
	});
	supervisor.defer(
		'postgres',
		async () => {
			await pg.stop();
			info('PostgreSQL stopped');
		},
		() => pg.stopSync()
	);
	info(`PostgreSQL on ${HOST}:${ports.pg} (log: ${join(dataDir, 'postgres.log')})`);
	await pg.ensureRoleAndDatabase(DB);

	const oidcSecret = randomSecret();
	const oidc = await startOidcFake({
		port: ports.oidc,
		clientId: 'headroom',
		clientSecret: oidcSecret,
		redirectUri: `${appUrl}/auth/callback/oidc`
	});
	supervisor.defer('oidc', () => oidc.stop());
	info(`OpenID provider fake at ${oidc.issuer}`);

	const env = appEnv({
		databaseUrl: pg.url(DB.role, DB.password, DB.database),
		s3Port: ports.s3,
		bucket: BUCKET,
		smtpPort: ports.smtp,
		mailWebPort: ports.mailWeb,
		webPort: ports.web,
		authSecret: persistentSecret(join(dataDir, 'auth-secret'), process.env.AUTH_SECRET),
		storageEventsSecret: persistentSecret(
			join(dataDir, 'storage-events-secret'),
			process.env.STORAGE_EVENTS_SECRET
		),
		nodeEnv: process.env.NODE_ENV || 'production'
	});
	Object.assign(env, {
		OIDC_ISSUER: oidc.issuer,
		OIDC_CLIENT_ID: 'headroom',
		OIDC_CLIENT_SECRET: oidcSecret,
		OIDC_NAME: 'Company SSO (local fake)'
	});

	await supervisor.runOrThrow(appProcess(root, 'migrate', env));
	await startS3Fake(supervisor, {
		root,
		port: ports.s3,
		dir: join(dataDir, 's3'),
		bucket: BUCKET,
		forwardUrl: storageEventsUrl(ports.web),
		storageEventsSecret: env.STORAGE_EVENTS_SECRET
	});
	await startMailFake(supervisor, {
		root,
		smtpPort: ports.smtp,
		webPort: ports.mailWeb,
		mailDir: join(dataDir, 'mail')
	});
	await buildIfStale(supervisor, root, env, override('build'));
	// The demo seed refuses NODE_ENV=production (its guard for real deployments); a local demo is
	// exactly where it belongs.
	await supervisor.runOrThrow(appProcess(root, 'seed', { ...env, NODE_ENV: 'development' }));
	supervisor.start(appProcess(root, 'worker', env));
	const web = supervisor.start(appProcess(root, 'web', env));
	await waitForHttp('the web server', `${appUrl}/api/health`, { child: web, timeoutMs: 90_000 });
}

function banner(): void {
	const roles = ['viewer', 'engineer', 'lead', 'admin'];
	console.log(
		[
			'',
			bold(`Headroom is running at ${appUrl}`),
			`  Mail inbox:   ${inboxUrl}`,
			`  Sign in as:   ${roles.map((r) => `${r}@headroom.test`).join(', ')}`,
			'                password headroom-demo',
			`  API tokens:   ${roles.map((r) => `hr_demo_${r}`).join(', ')}`,
			`  Single sign-on: ${DEFAULT_OIDC_USERS.map((u) => u.email).join(', ')} (password ${OIDC_FAKE_PASSWORD})`,
			`  Data:         ${dataDir}`,
			'Press Ctrl-C to stop.',
			''
		].join('\n')
	);
}

try {
	await up();
	banner();
} catch (err) {
	if (exitCode === undefined) {
		error(errorMessage(err));
		await shutdown(1);
	}
}
