import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../src/lib/server/db/options';
import { migrate } from '../../src/lib/server/db/orm';
import { createTestDatabase, type TestDatabase } from './support/db';

let db: TestDatabase;
let orm: MikroORM;

beforeAll(async () => {
	db = await createTestDatabase('migrations');
	orm = await MikroORM.init(ormOptions(db.url));
});
afterAll(async () => {
	await orm?.close(true);
	await db?.drop();
});

describe('migrations', () => {
	it('apply on an empty database and leave no difference to the entities', async () => {
		const applied = await migrate(orm);
		expect(applied.length).toBeGreaterThan(0);
		// The committed migrations must describe exactly what the entities declare.
		const diff = await orm.getSchemaGenerator().getUpdateSchemaSQL({ wrap: false });
		expect(diff.trim()).toBe('');
	});

	it('are idempotent: a second run applies nothing', async () => {
		expect(await migrate(orm)).toEqual([]);
	});

	it('enforce unique e-mail addresses in the database itself', async () => {
		const conn = orm.em.getConnection();
		await conn.execute(`insert into app_user (email, name) values ('a@x.test', 'A')`);
		await expect(
			conn.execute(`insert into app_user (email, name) values ('a@x.test', 'B')`)
		).rejects.toThrow(/unique/i);
	});
});
