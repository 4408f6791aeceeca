import type { EntityManager } from '@mikro-orm/postgresql';
import { AuditEventSchema, UserSchema, type User } from '../db/entities';

export interface AuditEntry {
	/** The user who acted; null for the system (seed, jobs). */
	actorId: string | null;
	action: string;
	entityType: string;
	entityId: string;
	before?: Record<string, unknown> | null;
	after?: Record<string, unknown> | null;
}

/**
 * Queue an audit event in the caller's unit of work, so it commits (or rolls back) with the
 * change it describes.
 */
export function recordAudit(em: EntityManager, entry: AuditEntry): void {
	em.create(AuditEventSchema, {
		at: new Date(),
		actor: entry.actorId ? em.getReference(UserSchema, entry.actorId) : null,
		action: entry.action,
		entityType: entry.entityType,
		entityId: entry.entityId,
		before: entry.before ?? null,
		after: entry.after ?? null
	});
}

/** What the trail keeps of a user: never the password hash. */
export function userSnapshot(user: User): Record<string, unknown> {
	return { email: user.email, name: user.name, role: user.role, active: user.active };
}
