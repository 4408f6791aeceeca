import PgBoss from 'pg-boss';
import { databaseUrl } from '../config';
import { QUEUES, QUEUE_OPTIONS } from './queues';

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
		max: role === 'web' ? 4 : 6,
		supervise: role === 'worker',
		schedule: role === 'worker',
		migrate: true
	});
	// pg-boss emits errors (lost connections, maintenance failures) instead of throwing;
	// an unhandled 'error' event would crash the process.
	boss.on('error', (error) => console.error(`[jobs] ${role}:`, error.message));
	return boss;
}

export async function createQueues(boss: PgBoss): Promise<void> {
	for (const name of Object.values(QUEUES)) {
		await boss.createQueue(name, { name, ...QUEUE_OPTIONS[name] });
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

export async function stopBoss(): Promise<void> {
	if (!webBoss) return;
	const boss = await webBoss.catch(() => undefined);
	webBoss = undefined;
	await boss?.stop({ graceful: true, timeout: 5_000 });
}
