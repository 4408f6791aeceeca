import type { EntityManager } from '@mikro-orm/postgresql';
import { UserSchema, type User } from '../db/entities';
import { scopesForRole, type Scope } from '../../auth/roles';
import { resolveToken } from './tokens';

/** What App.Locals carries about the caller. */
export interface Principal {
	user: { id: string; email: string; name: string; role: User['role'] };
	scopes: Scope[];
}

const toLocals = (user: User, scopes: Scope[]): Principal => ({
	user: { id: user.id, email: user.email, name: user.name, role: user.role },
	scopes
});

/**
 * The user behind a session cookie, read afresh: gone, deactivated, or signed in before their
 * sessions were cut (deactivation, password change) all mean anonymous.
 */
export async function principalFromSession(
	em: EntityManager,
	session: { userId: string; signedInAt?: number }
): Promise<Principal | null> {
	const user = await em.findOne(UserSchema, { id: session.userId });
	if (!user || !user.active) return null;
	const validFrom = user.sessionsValidFrom?.getTime();
	if (validFrom !== undefined && (session.signedInAt ?? 0) < validFrom) return null;
	return toLocals(user, scopesForRole(user.role));
}

export async function principalFromBearer(em: EntityManager, value: string): Promise<Principal | null> {
	const found = await resolveToken(em, value);
	return found && toLocals(found.user, found.scopes);
}
