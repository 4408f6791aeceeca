/** Seed the demo scenario into an empty database (`npm run db:seed`; run by `npm start`). */
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../src/lib/server/db/options';
import { databaseUrl } from '../src/lib/server/config';
import { seedDemo } from '../src/lib/server/seed/demo';
import { stopBoss } from '../src/lib/server/jobs/boss';
import { uploadDemoModels } from '../src/lib/server/seed/demo-models';
import { ensureBucket } from '../src/lib/server/storage/s3';

const orm = await MikroORM.init(ormOptions(databaseUrl()));
try {
	const outcome = await seedDemo(orm.em.fork());
	console.log(outcome.seeded ? 'demo data seeded' : `demo seed skipped: ${outcome.reason}`);
	if (outcome.seeded) {
		await ensureBucket();
		const n = await uploadDemoModels(orm.em.fork());
		console.log(`demo models uploaded: ${n} revisions queued for the worker`);
	}
} catch (error) {
	console.error('seed failed:', error instanceof Error ? error.message : error);
	process.exitCode = 1;
} finally {
	// Seeding targets enqueues re-judge jobs through the queue's sender.
	await stopBoss();
	await orm.close(true);
}
