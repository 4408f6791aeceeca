/** Seed the demo scenario into an empty database (`npm run db:seed`; run by `npm start`). */
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../src/lib/server/db/options';
import { databaseUrl } from '../src/lib/server/config';
import { seedDemo } from '../src/lib/server/seed/demo';

const orm = await MikroORM.init(ormOptions(databaseUrl()));
try {
	const outcome = await seedDemo(orm.em.fork());
	console.log(outcome.seeded ? 'demo data seeded' : `demo seed skipped: ${outcome.reason}`);
} catch (error) {
	console.error('seed failed:', error instanceof Error ? error.message : error);
	process.exitCode = 1;
} finally {
	await orm.close(true);
}
