import type { EntityManager } from '@mikro-orm/postgresql';
import type { EmSource } from '../db/registry-changes';
import type { User } from '../db/entities';
import { isUuid } from '../registry/common';
import { scopesForRole, type Scope } from '../../auth/roles';
import { resolveToken } from './tokens';
import { preparedRows } from '../db/prepared';

/** What App.Locals carries about the caller. */
export interface Principal {
	user: { id: string; email: string; name: string; role: User['role'] };
	scopes: Scope[];
}

const toLocals = (user: Principal['user'], scopes: Scope[]): Principal => ({
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
	if (!isUuid(session.userId)) return null;
	// Every signed-in page and call reads this: one indexed row, no entity hydration.
	const [user] = await preparedRows<
		Principal['user'] & { active: boolean; valid_from_ms: number | null }
	>(
		em,
		`select id, email, name, role, active, floor(extract(epoch from sessions_valid_from) * 1000)::float8 as valid_from_ms
		 from app_user where id = ?`,
		[session.userId]
	);
	if (!user || !user.active) return null;
	if (user.valid_from_ms !== null && (session.signedInAt ?? 0) < user.valid_from_ms) return null;
	return toLocals(user, scopesForRole(user.role));
}

export async function principalFromBearer(em: EmSource, value: string): Promise<Principal | null> {
	const found = await resolveToken(em, value);
	return found && toLocals(found.user, found.scopes);
}
