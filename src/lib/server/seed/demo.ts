import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { hash } from '@node-rs/argon2';
import { ApiTokenSchema, ROLES, UserSchema, type Role } from '../db/entities';
import { scopesForRole } from '../../auth/roles';
import { sha256 } from '../auth/secrets';
import { seedRegistry } from './demo-registry';

export const DEMO_PASSWORD = 'headroom-demo';

export const DEMO_USERS: { email: string; name: string; role: Role; token: string }[] = ROLES.map((role) => ({
	email: `${role}@headroom.test`,
	name: { viewer: 'Vera Viewer', engineer: 'Emil Engineer', lead: 'Lena Lead', admin: 'Ada Admin' }[
		role
	],
	role,
	// Published values (README, start banner) so a newcomer can try the API with curl.
	token: `hr_demo_${role}`
}));

export interface SeedOutcome {
	seeded: boolean;
	reason?: string;
}

/**
 * Demo data for an empty database (`npm start`, `npm run db:seed`). Refuses in production so a
 * misconfigured deployment never gets accounts with a published password or published tokens.
 */
export async function seedDemo(em: EntityManager): Promise<SeedOutcome> {
	if (process.env.NODE_ENV === 'production') {
		throw new Error('The demo seed refuses to run with NODE_ENV=production.');
	}
	if ((await em.count(UserSchema)) > 0) return { seeded: false, reason: 'database is not empty' };
	const passwordHash = await hash(DEMO_PASSWORD);
	await em.transactional(async (tx) => {
		const ids = {} as Record<Role, string>;
		for (const { token, ...user } of DEMO_USERS) {
			const id = randomUUID();
			ids[user.role] = id;
			tx.create(UserSchema, { ...user, id, passwordHash, active: true, createdAt: new Date() });
			tx.create(ApiTokenSchema, {
				id: randomUUID(),
				owner: tx.getReference(UserSchema, id),
				name: 'Demo token',
				tokenHash: sha256(token),
				hint: token.slice(0, 8),
				// Every scope the role allows.
				scopes: scopesForRole(user.role),
				createdAt: new Date()
			});
		}
		await tx.flush();
		// The registry's demo: products, classes with target history, loops, deviations.
		await seedRegistry(tx, ids);
	});
	return { seeded: true };
}
