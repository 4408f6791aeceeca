import { getOrm } from '../db/orm';
import { headBucket } from '../storage/s3';
import { getBoss, BOSS_SCHEMA } from '../jobs/boss';
import { version } from '$app/environment';

export type ComponentName = 'database' | 'storage' | 'queue';

export interface ComponentState {
	status: 'up' | 'down';
	latencyMs: number;
	error?: string;
}

export interface HealthReport {
	status: 'up' | 'down';
	version: string;
	/** Names of the components that are down (empty when all are up). */
	down: ComponentName[];
	components: Record<ComponentName, ComponentState>;
}

const TIMEOUT_MS = 2_500;

/** A check never hangs the health answer: after the timeout it counts as down. */
async function probe(check: (signal: AbortSignal) => Promise<unknown>): Promise<ComponentState> {
	const started = performance.now();
	const controller = new AbortController();
	let timer: ReturnType<typeof setTimeout> | undefined;
	const timeout = new Promise<never>((_, reject) => {
		timer = setTimeout(() => {
			controller.abort();
			reject(new Error(`no answer within ${TIMEOUT_MS} ms`));
		}, TIMEOUT_MS);
	});
	try {
		await Promise.race([check(controller.signal), timeout]);
		return { status: 'up', latencyMs: Math.round(performance.now() - started) };
	} catch (error) {
		return {
			status: 'down',
			latencyMs: Math.round(performance.now() - started),
			error: describe(error)
		};
	} finally {
		clearTimeout(timer);
	}
}

function describe(error: unknown): string {
	if (error instanceof AggregateError && error.errors.length) return describe(error.errors[0]);
	if (error instanceof Error) {
		const code = (error as { code?: string }).code;
		return [error.name !== 'Error' ? error.name : '', code, error.message]
			.filter(Boolean)
			.join(': ')
			.slice(0, 200);
	}
	return String(error).slice(0, 200);
}

export async function checkHealth(): Promise<HealthReport> {
	const [database, storage, queue] = await Promise.all([
		probe(async () => (await getOrm()).em.getConnection().execute('select 1')),
		probe((signal) => headBucket(signal)),
		probe(async () => {
			const boss = await getBoss();
			// Reads pg-boss's own schema: proves it is installed and its tables answer.
			await boss.getDb().executeSql(`select 1 from ${BOSS_SCHEMA}.version`, []);
		})
	]);
	const components = { database, storage, queue };
	const down = (Object.keys(components) as ComponentName[]).filter(
		(name) => components[name].status === 'down'
	);
	return { status: down.length ? 'down' : 'up', version, down, components };
}
