import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, existsSync } from 'node:fs';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../../src/lib/server/db/options';
import { migrate } from '../../../src/lib/server/db/orm';
import { seedDemo } from '../../../src/lib/server/seed/demo';
import { DEMO_LOOPS } from '../../../src/lib/server/seed/demo-scenario';
import { listClasses } from '../../../src/lib/server/registry/classes';
import { listLoops } from '../../../src/lib/server/registry/loops';
import { listProducts } from '../../../src/lib/server/registry/products';
import { listDeviations } from '../../../src/lib/server/registry/deviations';
import { requirementHistory } from '../../../src/lib/server/registry/requirements';
import { createTestDatabase, type TestDatabase } from '../support/db';

let db: TestDatabase;
let orm: MikroORM;
const all = { page: 1, pageSize: 200 };
beforeAll(async () => {
	db = await createTestDatabase('reg_seed');
	orm = await MikroORM.init(ormOptions(db.url));
	await migrate(orm);
});
afterAll(async () => {
	await orm?.close(true);
	await db?.drop();
});

describe('demo scenario', () => {
	it('seeds an empty database with products, classes with target history, loops and deviations', async () => {
		expect(await seedDemo(orm.em.fork())).toEqual({ seeded: true });
		const em = orm.em.fork();
		expect((await listProducts(em, all)).total).toBeGreaterThanOrEqual(3);
		const classes = await listClasses(em, all);
		expect(classes.total).toBeGreaterThanOrEqual(5);
		expect(classes.items.every((c) => c.requirement !== null && c.lead?.email === 'lead@headroom.test')).toBe(true);
		const current = classes.items.find((c) => c.key === 'current')!;
		expect(current.requirement).toMatchObject({ version: 2, targets: { minPhaseMarginDeg: '50', minUpperGainMarginDb: '8' } });
		expect((await requirementHistory(em, 'current', all)).items.map((v) => v.version)).toEqual([2, 1]);
		const loops = await listLoops(em, {}, all);
		expect(loops.total).toBeGreaterThanOrEqual(30);
		const owners = new Set(loops.items.map((l) => l.owner.email));
		expect([...owners].every((e) => e.endsWith('@headroom.test'))).toBe(true);
		expect(owners.size).toBeGreaterThan(1);
		const statuses = [];
		for (const l of loops.items) statuses.push(...(await listDeviations(em, l.id)).map((d) => d.status));
		expect(statuses.sort()).toEqual(['active', 'expired']);
		const audit = await em.getConnection().execute<{ n: number }[]>('select count(*)::int as n from audit_event');
		expect(audit[0].n).toBeGreaterThan(40);
	});

	it('seeds nothing into a database that is not empty', async () => {
		expect(await seedDemo(orm.em.fork())).toEqual({ seeded: false, reason: 'database is not empty' });
		expect((await listLoops(orm.em.fork(), {}, all)).total).toBe(DEMO_LOOPS.length);
	});

	it('refuses to run in production', async () => {
		const env = process.env.NODE_ENV;
		process.env.NODE_ENV = 'production';
		try {
			await expect(seedDemo(orm.em.fork())).rejects.toThrow(/production/);
		} finally {
			process.env.NODE_ENV = env;
		}
	});

	it('has a model file for every loop its manifest names, and only for demo loops', () => {
		const manifest = JSON.parse(readFileSync('fixtures/demo/manifest.json', 'utf8')) as { loops: Record<string, string> };
		const ids = new Set(DEMO_LOOPS.map((l) => `${l.product}/${l.key}`));
		expect(Object.keys(manifest.loops).length).toBeGreaterThanOrEqual(20);
		for (const [id, file] of Object.entries(manifest.loops)) {
			expect(ids.has(id), id).toBe(true);
			expect(existsSync(`fixtures/demo/${file}`), file).toBe(true);
		}
	});
});
