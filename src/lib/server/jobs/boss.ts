import PgBoss from 'pg-boss';
import { databaseUrl, jobMaintenanceSeconds } from '../config';
import { QUEUES, queueOptions } from './queues';

export const BOSS_SCHEMA = 'pgboss';

export interface BossOptions {
	/** Workers run maintenance and cron; web servers only send. */
	role: 'web' | 'worker';
	connectionString?: string;
}

export function createBoss({ role, connectionString }: BossOptions): PgBoss {
	const boss = new PgBoss({
		connectionString: connectionString ?? databaseUrl(),
		schema: BOSS_SCHEMA,
		application_name: `headroom-${role}`,
		max: role === 'web' ? 4 : 8,
		supervise: role === 'worker',
		schedule: role === 'worker',
		...(role === 'worker' && jobMaintenanceSeconds() ? { maintenanceIntervalSeconds: jobMaintenanceSeconds() } : {}),
		migrate: true
	});
	// pg-boss emits errors (lost connections, maintenance failures) instead of throwing;
	// an unhandled 'error' event would crash the process.
	boss.on('error', (error) => console.error(`[jobs] ${role}:`, error.message));
	return boss;
}

/** Create our queues, and bring existing ones to the current policy (retries, expiry). */
export async function createQueues(boss: PgBoss, { update = false } = {}): Promise<void> {
	const options = queueOptions();
	for (const name of Object.values(QUEUES)) {
		await boss.createQueue(name, { name, ...options[name] });
		if (update) await boss.updateQueue(name, { name, ...options[name] });
	}
}

let webBoss: Promise<PgBoss> | undefined;

/** The web server's sender, started on first use. */
export function getBoss(): Promise<PgBoss> {
	webBoss ??= (async () => {
		const boss = createBoss({ role: 'web' });
		await boss.start();
		return boss;
	})().catch((error) => {
		webBoss = undefined;
		throw error;
	});
	return webBoss;
}

let sender: PgBoss | undefined;

/**
 * A never-started instance that only builds pg-boss's statements: every send through it passes
 * the caller's transaction as `db`, so it needs no pool (and works in any process, tests too).
 */
export function txSender(): PgBoss {
	sender ??= new PgBoss({
		schema: BOSS_SCHEMA,
		db: {
			executeSql: () => {
				throw new Error('txSender() sends only with an explicit { db } (a transaction).');
			}
		}
	});
	return sender;
}

/**
 * Install pg-boss's schema and our queues (idempotent); part of migrating a database, so a job
 * can be enqueued in a transaction before any worker has ever started.
 */
export async function installQueues(connectionString: string): Promise<void> {
	const boss = new PgBoss({ connectionString, schema: BOSS_SCHEMA, supervise: false, schedule: false, migrate: true, max: 2 });
	boss.on('error', (error) => console.error('[jobs] install:', error.message));
	await boss.start();
	try {
		await createQueues(boss);
	} finally {
		await boss.stop({ graceful: false, wait: true });
	}
}

export async function stopBoss(): Promise<void> {
	if (!webBoss) return;
	const boss = await webBoss.catch(() => undefined);
	webBoss = undefined;
	await boss?.stop({ graceful: true, timeout: 5_000 });
}
