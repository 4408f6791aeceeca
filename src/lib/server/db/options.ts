import { defineConfig, type Options } from '@mikro-orm/postgresql';
import { Migrator } from '@mikro-orm/migrations';
import { entities } from './entities';
import { migrationsList } from './migrations';

/**
 * The one ORM configuration, shared by the web server, the worker, scripts and tests.
 * Entities are listed (no folder discovery) and migrations come from a static list, so the
 * adapter-node bundle, tsx and vitest all load exactly the same metadata with no globbing.
 */
export function ormOptions(clientUrl: string, overrides: Partial<Options> = {}): Options {
	return defineConfig({
		clientUrl,
		entities,
		extensions: [Migrator],
		discovery: { warnWhenNoEntities: true },
		// A bounded pool per process: web replicas and workers all share one PostgreSQL.
		pool: { min: 0, max: Number(process.env.DATABASE_POOL_MAX ?? 10) },
		migrations: {
			tableName: 'mikro_orm_migrations',
			path: 'src/lib/server/db/migrations',
			pathTs: 'src/lib/server/db/migrations',
			migrationsList,
			transactional: true,
			allOrNothing: true,
			snapshot: false,
			emit: 'ts'
		},
		debug: process.env.DATABASE_DEBUG === '1',
		...overrides
	});
}
