import type { EntityManager } from '@mikro-orm/postgresql';
import { hash } from '@node-rs/argon2';
import { ROLES, UserSchema, type Role } from '../db/entities';

export const DEMO_PASSWORD = 'headroom-demo';

export const DEMO_USERS: { email: string; name: string; role: Role }[] = ROLES.map((role) => ({
	email: `${role}@headroom.test`,
	name: { viewer: 'Vera Viewer', engineer: 'Emil Engineer', lead: 'Lena Lead', admin: 'Ada Admin' }[
		role
	],
	role
}));

export interface SeedOutcome {
	seeded: boolean;
	reason?: string;
}

/**
 * Demo data for an empty database (`npm start`, `npm run db:seed`). Refuses in production so a
 * misconfigured deployment never gets accounts with a published password.
 */
export async function seedDemo(em: EntityManager): Promise<SeedOutcome> {
	if (process.env.NODE_ENV === 'production') {
		throw new Error('The demo seed refuses to run with NODE_ENV=production.');
	}
	if ((await em.count(UserSchema)) > 0) return { seeded: false, reason: 'database is not empty' };
	const passwordHash = await hash(DEMO_PASSWORD);
	await em.transactional(async (tx) => {
		for (const user of DEMO_USERS) {
			tx.create(UserSchema, { ...user, passwordHash, active: true, createdAt: new Date() });
		}
	});
	return { seeded: true };
}
