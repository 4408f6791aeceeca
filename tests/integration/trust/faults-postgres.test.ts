/**
 * PostgreSQL restarted under a running web server (the built app) and a running worker: a
 * cluster of this file's own, stopped and started again on the same port. During the outage
 * every request answers 503 in words within its time box (none hangs, none is a 500); after it,
 * both processes serve again without being restarted themselves: pages and the API answer, and
 * an upload made after the restart is computed by the same worker.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { chmodSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { MikroORM } from '@mikro-orm/postgresql';
import { startCluster, type Cluster, type ClusterOptions } from '../../../scripts/lib/postgres';
import { freePort } from '../../../scripts/lib/ports';
import { randomSecret } from '../../../scripts/lib/secrets';
import { ensureBuilt, BUILD_TIMEOUT_MS } from '../support/built-app';
import { HttpClient } from '../support/http-client';
import { ormOptions } from '../../../src/lib/server/db/options';
import { migrate } from '../../../src/lib/server/db/orm';
import { seedDemo } from '../../../src/lib/server/seed/demo';
import { apiUpload, boxedFetch, demoSessions, serverEnv, startWorker, trustAppEnv, until, type Boxed, type WorkerProcess } from './support';

const root = resolve(import.meta.dirname, '../../..');
const temp = mkdtempSync(join(tmpdir(), 'headroom-trust-pg-'));
chmodSync(temp, 0o755);
let options: ClusterOptions;
let cluster: Cluster;
let dbUrl: string;
let web: ChildProcess;
let webLog = '';
let webUrl: string;
let worker: WorkerProcess;
let engineer: HttpClient;
let loopId: string;

beforeAll(async () => {
	ensureBuilt();
	options = {
		dataDir: join(temp, 'data'),
		socketDir: join(temp, 'run'),
		port: await freePort(),
		logFile: join(temp, 'postgres.log'),
		superuserPassword: randomSecret(),
		throwaway: true
	};
	cluster = await startCluster(options);
	const db = { role: 'headroom', password: 'headroom', database: 'trust_pg' };
	await cluster.ensureRoleAndDatabase(db);
	dbUrl = cluster.url(db.role, db.password, db.database);
	const orm = await MikroORM.init(ormOptions(dbUrl, { pool: { min: 0, max: 2 } }));
	try {
		await migrate(orm);
		await seedDemo(orm.em.fork());
		[{ id: loopId }] = await orm.em.getConnection().execute<{ id: string }[]>(
			`select l.id from loop l join app_user u on u.id = l.owner_id where u.email = 'engineer@headroom.test' and l.archived_at is null order by l.key limit 1`
		);
	} finally {
		await orm.close(true);
	}
	worker = await startWorker(dbUrl);
	const port = await freePort();
	webUrl = `http://127.0.0.1:${port}`;
	web = spawn(process.execPath, [resolve(root, 'build')], { cwd: root, env: serverEnv(port, dbUrl, trustAppEnv), stdio: ['ignore', 'pipe', 'pipe'] });
	web.stdout?.on('data', (d) => (webLog += d));
	web.stderr?.on('data', (d) => (webLog += d));
	await until('the web server', async () => ((await boxedFetch(`${webUrl}/api/health`)).status === 200 ? true : undefined), 60_000, () => webLog);
	engineer = (await demoSessions(webUrl)).engineer;
}, BUILD_TIMEOUT_MS);

afterAll(async () => {
	await worker?.stop();
	if (web && web.exitCode === null) {
		const exited = new Promise((r) => web.once('exit', r));
		web.kill('SIGTERM');
		await exited;
	}
	await cluster?.stop().catch(() => cluster.stopSync());
	rmSync(temp, { recursive: true, force: true });
});

const token = { authorization: 'Bearer hr_demo_engineer', accept: 'application/json' };
const sessionGet = async (path: string): Promise<Boxed> => {
	const started = Date.now();
	try {
		const response = await engineer.request(path, { signal: AbortSignal.timeout(15_000) });
		return { status: response.status, body: await response.text(), ms: Date.now() - started, hung: false };
	} catch (err) {
		return { status: 0, body: String(err), ms: Date.now() - started, hung: (err as Error).name === 'TimeoutError' };
	}
};

describe('PostgreSQL restarted under the running web server and worker', () => {
	it('answers 503 during the outage, never hangs, and both processes recover on their own', async () => {
		expect((await boxedFetch(`${webUrl}/api/loops?pageSize=5`, { headers: token })).status).toBe(200);
		expect((await sessionGet(`/loops/${loopId}`)).status).toBe(200);
		const webPid = web.pid;
		const workerPid = worker.child.pid;

		await cluster.stop();
		const during: Record<string, Boxed> = {};
		try {
			// Twice each: the first meets the pool's dead connections, the second a refused connect.
			for (const round of [1, 2]) {
				during[`token GET /api/loops #${round}`] = await boxedFetch(`${webUrl}/api/loops?pageSize=5`, { headers: token });
				during[`token GET /api/loops/:id #${round}`] = await boxedFetch(`${webUrl}/api/loops/${loopId}`, { headers: token });
				during[`session GET /loops #${round}`] = await sessionGet('/loops');
				during[`session GET /loops/:id #${round}`] = await sessionGet(`/loops/${loopId}`);
				during[`GET /api/health #${round}`] = await boxedFetch(`${webUrl}/api/health`);
			}
			during['token upload'] = await apiUpload(webUrl, loopId, 'hr_demo_engineer', JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'polynomial', numerator: [2], denominator: [1, 3, 3, 1] }] }), 'outage.json');
			during['anonymous GET /'] = await boxedFetch(`${webUrl}/`);
		} finally {
			cluster = await startCluster(options);
		}
		const summary = Object.entries(during).map(([k, v]) => `${k}: ${v.hung ? 'HUNG' : v.status} ${v.networkError ?? ''}`);
		expect(Object.values(during).filter((v) => v.hung || v.networkError), summary.join('\n')).toEqual([]);
		for (const [what, answer] of Object.entries(during)) {
			if (what === 'anonymous GET /') {
				// The public status page stays up and says the database is down.
				expect([200, 503], what).toContain(answer.status);
				expect(answer.body, what).toMatch(/database/i);
				continue;
			}
			expect(answer.status, `${what}\n${summary.join('\n')}\n${answer.body.slice(0, 300)}`).toBe(503);
			expect(answer.body, what).toMatch(/unavailable|down/i);
		}

		// Recovery, with no restart of either process.
		await until('the API to answer again', async () => ((await boxedFetch(`${webUrl}/api/loops?pageSize=5`, { headers: token })).status === 200 ? true : undefined), 90_000, () => webLog);
		expect((await sessionGet(`/loops/${loopId}`)).status).toBe(200);
		const upload = await apiUpload(webUrl, loopId, 'hr_demo_engineer', JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'polynomial', numerator: [2.5], denominator: [1, 3, 3, 1] }] }), 'after-restart.json');
		expect(upload.status, upload.body).toBe(202);
		const id = upload.json.revision!.id;
		await until('the worker to compute the upload made after the restart', async () => {
			const r = await boxedFetch(`${webUrl}/api/revisions/${id}`, { headers: token });
			return r.status === 200 && /"state":"computed"/.test(r.body) ? true : undefined;
		}, 120_000, () => worker.log());
		expect(web.exitCode).toBeNull();
		expect(web.pid).toBe(webPid);
		expect(worker.child.exitCode).toBeNull();
		expect(worker.child.pid).toBe(workerPid);
	}, 300_000);
});
