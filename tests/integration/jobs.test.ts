import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../src/lib/server/db/options';
import { migrate } from '../../src/lib/server/db/orm';
import { QUEUES } from '../../src/lib/server/jobs/queues';
import { createTestDatabase, type TestDatabase } from './support/db';

let db: TestDatabase;
let worker: ChildProcess;
let workerLog = '';

async function waitFor<T>(what: string, probe: () => Promise<T | undefined>, ms = 30_000): Promise<T> {
	const until = Date.now() + ms;
	for (;;) {
		const value = await probe();
		if (value !== undefined) return value;
		if (Date.now() > until) throw new Error(`timed out waiting for ${what}; worker log:\n${workerLog}`);
		await new Promise((r) => setTimeout(r, 200));
	}
}

beforeAll(async () => {
	db = await createTestDatabase('jobs');
	const orm = await MikroORM.init(ormOptions(db.url));
	await migrate(orm);
	await orm.close(true);
	process.env.DATABASE_URL = db.url;
	// The real worker entry point, as its own process, exactly as `npm run worker` starts it.
	worker = spawn('npx', ['tsx', 'scripts/worker.ts'], {
		env: { ...process.env, DATABASE_URL: db.url },
		stdio: ['ignore', 'pipe', 'pipe']
	});
	worker.stdout?.on('data', (d) => (workerLog += d));
	worker.stderr?.on('data', (d) => (workerLog += d));
	await waitFor('the worker to start', async () => (workerLog.includes('ready') ? true : undefined));
});

afterAll(async () => {
	const { stopBoss } = await import('../../src/lib/server/jobs/boss');
	await stopBoss();
	if (worker && worker.exitCode === null) {
		worker.kill('SIGTERM');
		await new Promise((r) => worker.once('exit', r));
	}
	await db?.drop();
});

describe('job queue', () => {
	it('carries a job sent from the web side to a separate worker process and back', async () => {
		const { getBoss } = await import('../../src/lib/server/jobs/boss');
		const boss = await getBoss();
		const nonce = crypto.randomUUID();
		const id = await boss.send(QUEUES.ping, { nonce });
		expect(id).toBeTruthy();
		const job = await waitFor('the ping to complete', async () => {
			const found = await boss.getJobById<{ nonce: string }>(QUEUES.ping, id!);
			return found?.state === 'completed' ? found : undefined;
		});
		const output = job.output as { value?: { nonce: string; pid: number }[] } | { nonce: string; pid: number }[];
		const results = Array.isArray(output) ? output : (output.value ?? []);
		expect(results[0]?.nonce).toBe(nonce);
		// Completed by the worker process, not by this test process.
		expect(results[0]?.pid).toBeGreaterThan(0);
		expect(results[0]?.pid).not.toBe(process.pid);
	});

	it('stops the worker cleanly on SIGTERM', async () => {
		worker.kill('SIGTERM');
		const code = await new Promise<number | null>((r) => worker.once('exit', (c) => r(c)));
		expect(code).toBe(0);
	});
});
