import type PgBoss from 'pg-boss';
import { QUEUES, type PingData } from './queues';

/** Register every handler on a started worker boss. */
export async function registerHandlers(boss: PgBoss): Promise<void> {
	await boss.work<PingData>(QUEUES.ping, { pollingIntervalSeconds: 0.5 }, async (jobs) => {
		// The output is stored by pg-boss and read back by whoever sent the ping.
		return jobs.map((job) => ({ nonce: job.data.nonce, pid: process.pid }));
	});
}
