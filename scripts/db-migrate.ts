/** Apply pending migrations to DATABASE_URL (used by npm start and deployments). */
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../src/lib/server/db/options';
import { databaseUrl } from '../src/lib/server/config';
import { migrate } from '../src/lib/server/db/orm';

const orm = await MikroORM.init(ormOptions(databaseUrl()));
try {
	const applied = await migrate(orm);
	console.log(applied.length ? `applied ${applied.join(', ')}` : 'database is up to date');
} catch (error) {
	console.error('migration failed:', error instanceof Error ? error.message : error);
	process.exitCode = 1;
} finally {
	await orm.close(true);
}
