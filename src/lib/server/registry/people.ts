import type { EntityManager } from '@mikro-orm/postgresql';
import { UserSchema, type User } from '../db/entities';
import { atLeast, type Role } from '../../auth/roles';
import { Invalid } from '../errors';
import { isUuid, userRef, type UserRef } from './common';

/** An active user named by id or e-mail; `path` is the field to blame when there is none. */
export async function findPerson(em: EntityManager, ref: string, path: string): Promise<User> {
	const value = ref.trim();
	const where = isUuid(value) ? { id: value } : { email: value.toLowerCase() };
	const user = value ? await em.findOne(UserSchema, where) : null;
	if (!user || !user.active) throw new Invalid(`No active user ${value || '(blank)'}.`, path);
	return user;
}

export interface Person extends UserRef {
	role: Role;
}

/** Active users of at least `minimum` role, for owner and lead pickers. */
export async function listPeople(em: EntityManager, minimum: Role = 'viewer'): Promise<Person[]> {
	const users = await em.find(UserSchema, { active: true }, { orderBy: { name: 'asc' } });
	return users
		.filter((u) => atLeast(u.role, minimum))
		.map((u) => ({ ...userRef(u), role: u.role }));
}

/** Owners edit their loops and upload revisions, so they need at least the engineer role. */
export async function findOwner(em: EntityManager, ref: string): Promise<User> {
	const user = await findPerson(em, ref, 'owner');
	if (!atLeast(user.role, 'engineer'))
		throw new Invalid(
			`${user.name} is a ${user.role}; loop owners need the engineer role or higher.`,
			'owner'
		);
	return user;
}
