/**
 * A migrated database of its own per test file, with one user of each role (two engineers, so
 * "someone else's loop" can be tested) and small factories for the registry's records.
 */
import { MikroORM, type EntityManager } from '@mikro-orm/postgresql';
import { ormOptions } from '../../../src/lib/server/db/options';
import { migrate } from '../../../src/lib/server/db/orm';
import { UserSchema } from '../../../src/lib/server/db/entities';
import type { Role } from '../../../src/lib/auth/roles';
import type { Actor } from '../../../src/lib/server/registry/common';
import { createProduct } from '../../../src/lib/server/registry/products';
import { createClass } from '../../../src/lib/server/registry/classes';
import { createLoop } from '../../../src/lib/server/registry/loops';
import { createTestDatabase, type TestDatabase } from '../support/db';

export interface Registry {
	db: TestDatabase;
	orm: MikroORM;
	em: () => EntityManager;
	users: Record<'viewer' | 'engineer' | 'engineer2' | 'lead' | 'admin', Actor>;
	close: () => Promise<void>;
}

export async function setupRegistry(prefix: string): Promise<Registry> {
	const db = await createTestDatabase(prefix);
	const orm = await MikroORM.init(ormOptions(db.url));
	await migrate(orm);
	const em = orm.em.fork();
	const make = (key: string, role: Role): Actor => {
		const u = em.create(UserSchema, {
			email: `${key}@registry.test`,
			name: `${key[0].toUpperCase()}${key.slice(1)} Person`,
			role,
			active: true,
			createdAt: new Date()
		});
		return u as unknown as Actor;
	};
	const created = {
		viewer: make('viewer', 'viewer'),
		engineer: make('engineer', 'engineer'),
		engineer2: make('engineer2', 'engineer'),
		lead: make('lead', 'lead'),
		admin: make('admin', 'admin')
	};
	await em.flush();
	const users = Object.fromEntries(
		Object.entries(created).map(([k, u]) => [k, { id: u.id, email: u.email, name: u.name, role: u.role }])
	) as Registry['users'];
	return {
		db,
		orm,
		em: () => orm.em.fork(),
		users,
		close: async () => {
			await orm.close(true);
			await db.drop();
		}
	};
}

/** A product, a class with targets (PM ≥ 45°, GM ≥ 6 dB) and one loop owned by `engineer`. */
export async function basicScenario(r: Registry, suffix = '') {
	const product = await createProduct(r.em(), r.users.lead, { key: `drive${suffix}`, name: `Drive ${suffix}` });
	const loopClass = await createClass(r.em(), r.users.lead, {
		key: `speed${suffix}`,
		name: `Speed loop ${suffix}`,
		targets: { minPhaseMarginDeg: '45', minUpperGainMarginDb: '6', crossoverMinHz: '20', crossoverMaxHz: '300' }
	});
	const loop = await createLoop(r.em(), r.users.engineer, {
		product: product.key,
		class: loopClass.key,
		key: `ax1-speed${suffix}`,
		name: `Axis 1 speed ${suffix}`,
		tags: ['axis-1']
	});
	return { product, loopClass, loop };
}

export async function auditRows(r: Registry, entityType: string, entityId: string) {
	return r
		.em()
		.getConnection()
		.execute<{ action: string; actor_id: string | null; before: unknown; after: unknown }[]>(
			'select action, actor_id, before, after from audit_event where entity_type = ? and entity_id = ? order by id',
			[entityType, entityId]
		);
}
