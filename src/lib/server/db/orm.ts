import { MikroORM, type EntityManager } from '@mikro-orm/postgresql';
import { databaseUrl } from '../config';
import { ormOptions } from './options';
import { installQueues } from '../jobs/boss';

let shared: Promise<MikroORM> | undefined;

/** The process-wide ORM, initialised on first use (never during `vite build`). */
export function getOrm(): Promise<MikroORM> {
	shared ??= MikroORM.init(ormOptions(databaseUrl())).catch((error) => {
		// Let the next request try again instead of caching a failed start for ever.
		shared = undefined;
		throw error;
	});
	return shared;
}

/** A fresh EntityManager for one request or one job: no identity map shared between users. */
export async function forkEm(): Promise<EntityManager> {
	return (await getOrm()).em.fork();
}

export async function closeOrm(): Promise<void> {
	if (!shared) return;
	const orm = await shared.catch(() => undefined);
	shared = undefined;
	await orm?.close(true);
}

/** Apply every pending migration and install the job queues; returns the migrations applied. */
export async function migrate(orm: MikroORM): Promise<string[]> {
	const applied = await orm.getMigrator().up();
	await installQueues(orm.config.get('clientUrl')!);
	return applied.map((m) => m.name);
}
