/**
 * `npm run bench:load`: the built app and a worker on throwaway services (their own PostgreSQL
 * cluster, S3 fake and SMTP fake, removed afterwards), 10,000 loops seeded, then driven from a
 * second process (scripts/lib/load-driver.ts, autocannon) on loopback for a bounded time with a
 * mix of filtered /api/loops lists, /api/loops/:id, loop pages and revision uploads. Prints
 * throughput, latency percentiles and error counts per kind of request, then checks that no
 * request failed and nothing was lost: the revisions in the database grew by exactly the uploads
 * answered 202, and the worker computes each of them. Exit 1 when a check fails; timings are
 * figures, never a pass/fail criterion.
 *   BENCH_SECONDS (default 20), BENCH_LOOPS (10000), BENCH_CONNECTIONS (per kind, default 4)
 */
import { spawn } from 'node:child_process';
import { chmodSync, mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { appEnv, appProcess, override } from './lib/app';
import { buildIfStale } from './lib/build';
import { startMailFake } from './lib/mail';
import { freePort } from './lib/ports';
import { startCluster } from './lib/postgres';
import { withClient } from './lib/pg-client';
import { Supervisor } from './lib/processes';
import { startS3Fake } from './lib/s3';
import { randomSecret } from './lib/secrets';
import { waitForHttp } from './lib/wait';
import type { KindResult, LoadPlan } from './lib/load-driver';

const root = resolve(import.meta.dirname, '..');
const SECONDS = Number(process.env.BENCH_SECONDS ?? 20);
const LOOPS = Number(process.env.BENCH_LOOPS ?? 10_000);
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 4);
const temp = mkdtempSync(join(tmpdir(), 'headroom-load-'));
chmodSync(temp, 0o755);
const supervisor = new Supervisor();
process.on('exit', () => rmSync(temp, { recursive: true, force: true }));

async function signInCookie(origin: string): Promise<string> {
	const body = new URLSearchParams({ email: 'engineer@headroom.test', password: 'headroom-demo', next: '/' });
	const response = await fetch(`${origin}/signin?/password`, {
		method: 'POST',
		headers: { origin, 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
		body,
		redirect: 'manual'
	});
	const cookie = response.headers.getSetCookie().map((c) => c.split(';')[0]).find((c) => c.startsWith('authjs.session-token='));
	if (response.status !== 303 || !cookie) throw new Error(`sign-in for the page load failed: HTTP ${response.status}`);
	return cookie;
}

function drive(plan: LoadPlan): Promise<KindResult[]> {
	return new Promise((res, rej) => {
		const child = spawn(process.execPath, ['--import', 'tsx', join(root, 'scripts/lib/load-driver.ts'), JSON.stringify(plan)], { cwd: root, stdio: ['ignore', 'pipe', 'inherit'] });
		let out = '';
		child.stdout.on('data', (d) => (out += d));
		child.on('error', rej);
		child.on('exit', (code) => {
			const line = out.trim().split('\n').pop() ?? '';
			try {
				res(JSON.parse(line) as KindResult[]);
			} catch {
				rej(new Error(`the load driver exited ${code} without figures: ${out.slice(-500)}`));
			}
		});
	});
}

async function main(): Promise<boolean> {
	const pg = await startCluster({ dataDir: join(temp, 'pg'), port: await freePort(), logFile: join(temp, 'pg.log'), superuserPassword: randomSecret(), throwaway: true });
	supervisor.defer('postgres', () => pg.stop(), () => pg.stopSync());
	const db = { role: 'headroom', password: 'headroom', database: 'load' };
	await pg.ensureRoleAndDatabase(db);
	const [s3Port, smtpPort, mailWebPort, webPort] = [await freePort(), await freePort(), await freePort(), await freePort()];
	await startS3Fake(supervisor, { root, port: s3Port, dir: join(temp, 's3'), bucket: 'headroom' });
	await startMailFake(supervisor, { root, smtpPort, webPort: mailWebPort, mailDir: join(temp, 'mail') });
	await buildIfStale(supervisor, root, process.env, override('build'));
	const env = appEnv({
		databaseUrl: pg.url(db.role, db.password, db.database),
		s3Port,
		bucket: 'headroom',
		smtpPort,
		mailWebPort,
		webPort,
		authSecret: randomSecret(),
		storageEventsSecret: randomSecret(),
		nodeEnv: 'production'
	});
	await supervisor.runOrThrow(appProcess(root, 'migrate', env));
	await supervisor.runOrThrow(appProcess(root, 'seed', { ...env, NODE_ENV: 'test' }));

	// 10,000 loops next to the demo ones, owned by the demo engineer, with a spread of verdicts.
	const conn = { host: pg.admin.host, port: pg.port, user: 'postgres', database: db.database };
	await withClient(conn, async (c) => {
		await c.query(
			`insert into loop (id, product_id, loop_class_id, key, name, owner_id, tags, note, verdict)
			 select gen_random_uuid(), (select id from product order by key limit 1), (select id from loop_class order by key limit 1),
			        'load-' || g, 'Load loop ' || g, (select id from app_user where email = 'engineer@headroom.test'), '{}', '',
			        (array['compliant','noncompliant','unstable','covered','pending','empty','rejected'])[1 + g % 7]
			 from generate_series(1, $1::int) g`,
			[LOOPS]
		);
	});
	const query = async (sql: string) => withClient(conn, async (c) => (await c.query(sql)).rows);
	const loopIds = (await query(`select id from loop where key like 'load-%' order by random() limit 500`)).map((r) => String(r.id));
	const uploadLoopIds = loopIds.slice(0, 100);
	const [{ n: loopCount }] = await query('select count(*)::int as n from loop');

	supervisor.start(appProcess(root, 'worker', env));
	const web = supervisor.start(appProcess(root, 'web', env));
	await waitForHttp('the web server', `${env.ORIGIN}/api/health`, { child: web, timeoutMs: 90_000 });
	const cookie = await signInCookie(env.ORIGIN!);
	// Let the worker finish the demo models first, so it does not compete with the measured run.
	for (let i = 0; i < 240; i++) {
		const [{ n }] = await query(`select count(*)::int as n from revision where state in ('queued', 'computing')`);
		if (Number(n) === 0) break;
		await new Promise((r) => setTimeout(r, 500));
	}
	const [{ n: revisionsBefore }] = await query('select count(*)::int as n from revision');

	const load = loadavg().map((x) => x.toFixed(1)).join(' ');
	console.log(`\nload: ${loopCount} loops, ${SECONDS} s, ${CONNECTIONS} connections per kind, driven from a second process on loopback`);
	console.log(`machine: ${cpus().length} CPU cores, load average ${load} before the run (other work on the machine skews every figure)\n`);
	const results = await drive({
		base: env.ORIGIN!,
		seconds: SECONDS,
		token: 'hr_demo_engineer',
		cookie,
		loopIds,
		uploadLoopIds,
		connections: { 'api-filtered-list': CONNECTIONS, 'api-loop': CONNECTIONS, 'loop-page': CONNECTIONS, upload: Math.max(1, Math.floor(CONNECTIONS / 2)) }
	});

	console.log(`${'kind'.padEnd(20)}${'requests'.padStart(10)}${'req/s'.padStart(9)}${'p50 ms'.padStart(9)}${'p90 ms'.padStart(9)}${'p99 ms'.padStart(9)}${'max ms'.padStart(9)}${'errors'.padStart(8)}${'timeouts'.padStart(10)}${'non-2xx'.padStart(9)}  status codes`);
	for (const r of results) {
		console.log(
			`${r.kind.padEnd(20)}${String(r.requests).padStart(10)}${r.throughput.toFixed(1).padStart(9)}${String(r.p50).padStart(9)}${String(r.p90).padStart(9)}${String(r.p99).padStart(9)}${String(r.max).padStart(9)}${String(r.errors).padStart(8)}${String(r.timeouts).padStart(10)}${String(r.non2xx).padStart(9)}  ${JSON.stringify(r.statusCodes)}`
		);
	}
	const total = results.reduce((t, r) => t + r.requests, 0);
	console.log(`${'all'.padEnd(20)}${String(total).padStart(10)}${(total / SECONDS).toFixed(1).padStart(9)}`);

	const problems: string[] = [];
	for (const r of results) {
		if (r.errors || r.timeouts || r.non2xx) problems.push(`${r.kind}: ${r.errors} errors, ${r.timeouts} timeouts, ${r.non2xx} non-2xx answers`);
	}
	const uploads = results.find((r) => r.kind === 'upload')!;
	const acceptedIds = uploads.acceptedIds ?? [];
	const accepted = uploads.statusCodes['202'] ?? 0;
	// autocannon stops at the deadline with requests still in flight: the server may still commit
	// those. Wait until the count holds still, then account for every row.
	let added = -1;
	for (let stable = 0; stable < 3; ) {
		await new Promise((r) => setTimeout(r, 1000));
		const [{ n }] = await query('select count(*)::int as n from revision');
		const now = Number(n) - Number(revisionsBefore);
		stable = now === added ? stable + 1 : 0;
		added = now;
	}
	const found = new Set(
		(await query(`select id::text from revision where id = any('{${acceptedIds.join(',')}}'::uuid[])`)).map((r) => String(r.id))
	);
	const missing = acceptedIds.filter((id) => !found.has(id));
	const inFlight = added - accepted;
	console.log(`\nuploads answered 202: ${accepted} (ids read back: ${acceptedIds.length}); revisions added: ${added}, of them ${inFlight} from uploads still in flight when the run ended`);
	if (missing.length) problems.push(`${missing.length} uploads answered 202 have no revision row: ${missing.slice(0, 5).join(', ')}`);
	if (acceptedIds.length !== accepted) problems.push(`${accepted} uploads answered 202 but ${acceptedIds.length} revision ids came back`);
	if (inFlight < 0 || inFlight > Math.max(1, Math.floor(CONNECTIONS / 2))) problems.push(`${accepted} uploads accepted but ${added} rows added (at most one per upload connection may be in flight)`);

	// Every accepted upload is computed (or refused) by the worker: none lost in the queue.
	const deadline = Date.now() + 180_000;
	let pending = -1;
	while (Date.now() < deadline) {
		[{ n: pending }] = (await query(`select count(*)::int as n from revision where state in ('queued', 'computing')`)) as { n: number }[];
		if (pending === 0) break;
		await new Promise((r) => setTimeout(r, 1000));
	}
	const [{ n: computed }] = await query(`select count(*)::int as n from revision r join loop l on l.id = r.loop_id where l.key like 'load-%' and r.state = 'computed'`);
	console.log(`revisions computed by the worker afterwards: ${computed} of ${added}${pending ? ` (${pending} still waiting after 180 s)` : ''}`);
	if (pending !== 0) problems.push(`${pending} revisions still queued or computing after 180 s`);
	if (Number(computed) !== added) problems.push(`${added - Number(computed)} added revisions were not computed`);

	console.log(problems.length ? `\nFAILED:\n- ${problems.join('\n- ')}` : '\nno request failed and nothing was lost');
	return problems.length === 0;
}

let ok = false;
try {
	ok = await main();
} catch (err) {
	console.error(err);
} finally {
	await supervisor.stopAll();
}
process.exit(ok ? 0 : 1);
