// `npm test`: every suite against throwaway services of its own (temp folders, free ports), so
// it never touches the data or ports of a running `npm start`.
//   npm test                         unit + reference, then integration, then e2e
//   npm test -- --stage integration  one stage (repeat or comma-separate for several)
//   npm test -- --stage unit margins any other argument goes to every vitest run (a filter)
// Every selected stage runs even when an earlier one failed; the summary says which failed.
import { chmodSync, cpSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { commandExists, debianPackageInstalled, ensureDebianPackages } from './lib/apt';
import { appEnv, appProcess, override, storageEventsUrl } from './lib/app';
import { buildIfStale } from './lib/build';
import { startOidcFake } from './lib/oidc';
import { bold, error, errorMessage, green, info, red, warn } from './lib/log';
import { mailEnv, startMailFake } from './lib/mail';
import { freePort, HOST } from './lib/ports';
import { postgresInstalled, startCluster, type Cluster } from './lib/postgres';
import { onParentGone, onSignals } from './lib/lifecycle';
import { describeExit, Supervisor } from './lib/processes';
import { s3Env, startS3Fake } from './lib/s3';
import { randomSecret } from './lib/secrets';
import { countText, runVitest, type Counts, type Outcome } from './lib/vitest';
import { waitForHttp } from './lib/wait';

const root = resolve(import.meta.dirname, '..');
const STAGES = {
	unit: { label: 'unit + reference', projects: ['unit', 'reference'] },
	integration: { label: 'integration', projects: ['integration'] },
	e2e: { label: 'e2e (Chromium)', projects: ['e2e'] }
} as const;
type Stage = keyof typeof STAGES;
const BUCKET = 'headroom';
const CHROMIUM_PATH = '/usr/bin/chromium';

interface Result {
	stage: Stage;
	status: 'pass' | 'fail' | 'no tests' | 'not run';
	seconds: number;
	counts?: Counts;
	note?: string;
}

function parseArgs(argv: string[]): { stages: Stage[]; vitestArgs: string[] } {
	const stages: Stage[] = [];
	const vitestArgs: string[] = [];
	for (let i = 0; i < argv.length; i++) {
		const arg = argv[i];
		const value =
			arg === '--stage' ? argv[++i] : arg.startsWith('--stage=') ? arg.slice(8) : undefined;
		if (value === undefined) {
			vitestArgs.push(arg);
			continue;
		}
		for (const name of value.split(',')) {
			if (!(name in STAGES))
				throw new Error(`unknown stage "${name}" (stages: ${Object.keys(STAGES).join(', ')})`);
			if (!stages.includes(name as Stage)) stages.push(name as Stage);
		}
	}
	// Always in pipeline order, whatever order they were named in.
	const order = Object.keys(STAGES) as Stage[];
	return { stages: stages.length ? order.filter((s) => stages.includes(s)) : order, vitestArgs };
}

let parsed: ReturnType<typeof parseArgs>;
try {
	parsed = parseArgs(process.argv.slice(2));
} catch (err) {
	console.error(errorMessage(err));
	process.exit(2);
}
const { stages, vitestArgs } = parsed;
const supervisor = new Supervisor();
const temp = mkdtempSync(join(tmpdir(), 'headroom-test-'));
// The postgres user must be able to enter the folder that holds its cluster.
chmodSync(temp, 0o755);
// Registered after the supervisors' own exit hook, so PostgreSQL is down before its folder goes.
const buildCopy = join(root, '.tmp', `e2e-build-${process.pid}`);
process.on('exit', () => {
	rmSync(temp, { recursive: true, force: true });
	rmSync(buildCopy, { recursive: true, force: true });
});

let aborted = false;
/** The e2e stage's app processes, stopped first on an interrupt. */
let stageSupervisor: Supervisor | undefined;
const abort = () => {
	aborted = true;
	void (stageSupervisor?.stopAll() ?? Promise.resolve()).then(() => supervisor.stopAll());
};
onSignals(abort);
onParentGone(abort);

const secrets = { auth: randomSecret(), storageEvents: randomSecret() };
// Never let a suite fall back on a developer's own database from the calling shell.
const { DATABASE_URL: _ignored, ...callerEnv } = process.env;

interface Services {
	pg: Cluster;
	s3Port: number;
	smtpPort: number;
	mailWebPort: number;
	env: NodeJS.ProcessEnv;
}

async function startServices(): Promise<Services> {
	const pg = await startCluster({
		dataDir: join(temp, 'postgres'),
		socketDir: join(temp, 'run'),
		port: await freePort(),
		logFile: join(temp, 'postgres.log'),
		superuserPassword: randomSecret(),
		throwaway: true
	});
	supervisor.defer(
		'postgres',
		() => pg.stop(),
		() => pg.stopSync()
	);
	const s3Port = await freePort();
	await startS3Fake(supervisor, { root, port: s3Port, dir: join(temp, 's3'), bucket: BUCKET });
	const smtpPort = await freePort();
	const mailWebPort = await freePort();
	await startMailFake(supervisor, {
		root,
		smtpPort,
		webPort: mailWebPort,
		mailDir: join(temp, 'mail')
	});
	info(
		`services: PostgreSQL ${HOST}:${pg.port}, S3 fake ${HOST}:${s3Port}, SMTP ${HOST}:${smtpPort}`
	);
	const env: NodeJS.ProcessEnv = {
		...callerEnv,
		TEST_DATABASE_ADMIN_URL: pg.adminUrl,
		...s3Env(s3Port, BUCKET),
		...mailEnv(smtpPort, mailWebPort),
		TEST_MAIL_API_URL: `http://${HOST}:${mailWebPort}`,
		AUTH_SECRET: secrets.auth,
		STORAGE_EVENTS_SECRET: secrets.storageEvents
	};
	return { pg, s3Port, smtpPort, mailWebPort, env };
}
let services: Promise<Services> | undefined;
const getServices = () => (services ??= startServices());

function vitest(owner: Supervisor, stage: Stage, env: NodeJS.ProcessEnv): Promise<Outcome> {
	return runVitest(owner, {
		root,
		projects: STAGES[stage].projects,
		env,
		reportFile: join(temp, `vitest-${stage}.json`),
		extraArgs: vitestArgs
	});
}

/** Integration tests run against real services; some drive the built app, so build it once first. */
async function integration(): Promise<Outcome> {
	const { env } = await getServices();
	await buildIfStale(supervisor, root, callerEnv, override('build'));
	return vitest(supervisor, 'integration', env);
}

/** The built app with its worker, on its own database, S3 fake and port; then the e2e suite. */
async function e2e(): Promise<Outcome & { note?: string }> {
	const { pg, smtpPort, mailWebPort, env: testEnv } = await getServices();
	const stage = (stageSupervisor = new Supervisor());
	let crashed: string | undefined;
	stage.onUnexpectedExit = (child, exit) => {
		crashed = `${child.name} exited during the e2e stage (${describeExit(exit)})`;
		error(crashed);
		void stage.stopAll();
	};
	try {
		await buildIfStale(stage, root, callerEnv, override('build'));
		// Serve a private copy: a rebuild in this tree meanwhile (`npm start`, `npm run build`)
		// would swap the lazily loaded chunks under the running server. It stays inside the repo
		// (.tmp/ is git-ignored) so that node still finds node_modules from it.
		mkdirSync(join(root, '.tmp'), { recursive: true });
		cpSync(join(root, 'build'), buildCopy, { recursive: true });
		const db = { role: 'headroom', password: 'headroom', database: 'headroom_e2e' };
		await pg.ensureRoleAndDatabase(db);
		const [webPort, s3Port] = [await freePort(), await freePort()];
		const oidcSecret = randomSecret();
		const oidc = await startOidcFake({
			port: 0,
			clientId: 'headroom',
			clientSecret: oidcSecret,
			redirectUri: `http://${HOST}:${webPort}/auth/callback/oidc`
		});
		stage.defer('oidc', () => oidc.stop());
		const baseEnv = appEnv({
			databaseUrl: pg.url(db.role, db.password, db.database),
			s3Port,
			bucket: BUCKET,
			smtpPort,
			mailWebPort,
			webPort,
			authSecret: secrets.auth,
			storageEventsSecret: secrets.storageEvents,
			nodeEnv: 'production'
		});
		const env: NodeJS.ProcessEnv = {
			...baseEnv,
			OIDC_ISSUER: oidc.issuer,
			OIDC_CLIENT_ID: 'headroom',
			OIDC_CLIENT_SECRET: oidcSecret,
			OIDC_NAME: 'Company SSO'
		};
		// Its own S3 fake: only this one forwards object-created events, to this stage's app.
		await startS3Fake(stage, {
			root,
			name: 's3-e2e',
			port: s3Port,
			dir: join(temp, 's3-e2e'),
			bucket: BUCKET,
			forwardUrl: storageEventsUrl(webPort),
			storageEventsSecret: secrets.storageEvents
		});
		await stage.runOrThrow(appProcess(root, 'migrate', env));
		// The demo seed refuses NODE_ENV=production; the e2e suite signs in with its users.
		await stage.runOrThrow(appProcess(root, 'seed', { ...env, NODE_ENV: 'test' }));
		stage.start(appProcess(root, 'worker', env));
		const web = stage.start(appProcess(root, 'web', env, { buildDir: buildCopy }));
		await waitForHttp('the web server', `${env.ORIGIN}/api/health`, {
			child: web,
			timeoutMs: 90_000
		});
		const result = await vitest(stage, 'e2e', {
			...testEnv,
			...s3Env(s3Port, BUCKET),
			DATABASE_URL: env.DATABASE_URL,
			E2E_BASE_URL: env.ORIGIN,
			OIDC_ISSUER: oidc.issuer,
			CHROMIUM_PATH
		});
		return crashed ? { ...result, status: 'fail', note: crashed } : result;
	} finally {
		await stage.stopAll();
		stageSupervisor = undefined;
		rmSync(buildCopy, { recursive: true, force: true });
	}
}

async function runStage(stage: Stage): Promise<Result> {
	const started = Date.now();
	console.log(`\n${bold(`━━ ${STAGES[stage].label}`)}`);
	const seconds = () => (Date.now() - started) / 1000;
	try {
		const outcome =
			stage === 'unit'
				? await vitest(supervisor, stage, callerEnv)
				: stage === 'integration'
					? await integration()
					: await e2e();
		return { stage, ...outcome, seconds: seconds() };
	} catch (err) {
		error(`${STAGES[stage].label}: ${errorMessage(err)}`);
		return { stage, status: 'fail', seconds: seconds(), note: errorMessage(err).split('\n')[0] };
	}
}

function summary(results: Result[]): void {
	const paint = (status: Result['status']) =>
		status === 'pass' ? green : status === 'fail' ? red : (s: string) => s;
	console.log(
		`\n${bold('stage'.padEnd(20))}${bold('result'.padEnd(10))}${bold('time'.padStart(8))}  tests`
	);
	for (const r of results) {
		const time = `${r.seconds.toFixed(1)}s`.padStart(8);
		console.log(
			`${STAGES[r.stage].label.padEnd(20)}${paint(r.status)(r.status.padEnd(10))}${time}  ${countText(r.counts)}${r.note ? `  (${r.note})` : ''}`
		);
	}
	const total = results.reduce<Counts>(
		(t, r) => ({
			passed: t.passed + (r.counts?.passed ?? 0),
			failed: t.failed + (r.counts?.failed ?? 0),
			skipped: t.skipped + (r.counts?.skipped ?? 0)
		}),
		{ passed: 0, failed: 0, skipped: 0 }
	);
	// The one line CI reads for the totals ("N passed, N failed").
	console.log(`\ntests: ${countText(total)}`);
}

const results: Result[] = [];
try {
	try {
		ensureDebianPackages([
			{ pkg: 'postgresql-15', present: postgresInstalled },
			{ pkg: 'chromium', present: () => commandExists('chromium') },
			{ pkg: 'octave', present: () => commandExists('octave') },
			{ pkg: 'octave-control', present: () => debianPackageInstalled('octave-control') },
			{ pkg: 'poppler-utils', present: () => commandExists('pdftoppm') }
		]);
	} catch (err) {
		// Carry on: the stages that need a missing package will fail and say why.
		warn(`could not install Debian packages: ${errorMessage(err)}`);
	}
	for (const stage of stages) {
		results.push(
			aborted
				? { stage, status: 'not run', seconds: 0, note: 'interrupted' }
				: await runStage(stage)
		);
	}
} finally {
	await supervisor.stopAll();
}
summary(results);
process.exit(
	aborted ? 130 : results.every((r) => r.status === 'pass' || r.status === 'no tests') ? 0 : 1
);
