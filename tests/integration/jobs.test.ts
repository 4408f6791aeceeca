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
	// `node --import tsx` keeps it one process, so the signal reaches the worker itself.
	worker = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], {
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
	if (worker && worker.exitCode === null && worker.signalCode === null) {
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

	it('commits or rolls back a job together with the rows of the same transaction', async () => {
		const { getBoss } = await import('../../src/lib/server/jobs/boss');
		const { transactionalDb } = await import('../../src/lib/server/jobs/transactional');
		const { forkEm } = await import('../../src/lib/server/db/orm');
		const boss = await getBoss();
		const em = await forkEm();
		const conn = em.getConnection();
		let rolledBackJob: string | null = null;
		await expect(
			em.transactional(async (tx) => {
				await tx.getConnection().execute(
					`insert into app_user (email, name) values ('tx-rollback@x.test', 'R')`,
					[],
					'run',
					tx.getTransactionContext()
				);
				rolledBackJob = await boss.send(QUEUES.ping, { nonce: 'rolled-back' }, { db: transactionalDb(tx) });
				throw new Error('abort the write');
			})
		).rejects.toThrow('abort the write');
		expect(rolledBackJob).toBeTruthy();
		expect(await boss.getJobById(QUEUES.ping, rolledBackJob!)).toBeNull();
		expect(await conn.execute(`select 1 from app_user where email = 'tx-rollback@x.test'`)).toEqual([]);

		let committedJob: string | null = null;
		await em.transactional(async (tx) => {
			await tx.getConnection().execute(
				`insert into app_user (email, name) values ('tx-commit@x.test', 'C')`,
				[],
				'run',
				tx.getTransactionContext()
			);
			committedJob = await boss.send(QUEUES.ping, { nonce: 'committed' }, { db: transactionalDb(tx) });
		});
		expect(await boss.getJobById(QUEUES.ping, committedJob!)).not.toBeNull();
		expect(await conn.execute(`select 1 from app_user where email = 'tx-commit@x.test'`)).toHaveLength(1);
	});

	it('stops the worker cleanly on SIGTERM', async () => {
		worker.kill('SIGTERM');
		const code = await new Promise<number | null>((r) => worker.once('exit', (c) => r(c)));
		expect(code).toBe(0);
	});
});
