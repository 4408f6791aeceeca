/**
 * A database of its own for each test file, on the throwaway cluster of `npm test`:
 *
 *   const db = await createTestDatabase('revisions');   // then migrate db.url with the ORM
 *   afterAll(() => db.drop());
 *
 * The name is random, so files (and reruns after a crash) never collide; drop() ends any
 * sessions a pool or pg-boss left open.
 */
import { randomBytes } from 'node:crypto';
import { createDatabase, dropDatabase } from '../../../scripts/lib/pg-client';
import { testEnv } from './env';

export interface TestDatabase {
	name: string;
	/** Same credentials as TEST_DATABASE_ADMIN_URL (a superuser), pointed at this database. */
	url: string;
	drop(): Promise<void>;
}

export async function createTestDatabase(prefix = 'test'): Promise<TestDatabase> {
	const adminUrl = testEnv.databaseAdminUrl;
	// PostgreSQL folds unquoted names and cuts them at 63 bytes; keep them plain and short.
	const clean = prefix
		.toLowerCase()
		.replace(/[^a-z0-9_]+/g, '_')
		.slice(0, 40);
	const name = `t_${clean}_${randomBytes(4).toString('hex')}`;
	await createDatabase({ connectionString: adminUrl }, name);
	const url = new URL(adminUrl);
	url.pathname = `/${name}`;
	let dropped = false;
	return {
		name,
		url: url.toString(),
		async drop() {
			if (dropped) return;
			dropped = true;
			await dropDatabase({ connectionString: adminUrl }, name);
		}
	};
}
