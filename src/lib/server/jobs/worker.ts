import { createBoss, createQueues } from './boss';
import { registerHandlers } from './handlers';

export interface RunningWorker {
	stop(): Promise<void>;
}

/** Start one worker: pg-boss spreads jobs over every worker process on the same PostgreSQL. */
export async function startWorker(connectionString?: string): Promise<RunningWorker> {
	const boss = createBoss({ role: 'worker', connectionString });
	await boss.start();
	await createQueues(boss, { update: true });
	await registerHandlers(boss, { origin: process.env.ORIGIN ?? 'http://127.0.0.1:3000' });
	return {
		async stop() {
			// Graceful: running jobs finish (or are retried later if the timeout passes).
			await boss.stop({ graceful: true, timeout: 10_000, wait: true });
		}
	};
}
