import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { UserSchema } from './user';

/**
 * Who did what to which record, when, with the record before and after. Insert-only: a trigger
 * added by the migration refuses UPDATE, DELETE and TRUNCATE, so not even a bug can rewrite
 * history. Users are never deleted (only deactivated), so the actor reference stays valid.
 */
export const AuditEventSchema = defineEntity({
	name: 'AuditEvent',
	tableName: 'audit_event',
	properties: {
		// A sequence keeps the order events were written in, even within one transaction.
		id: p.bigint('string').primary().autoincrement(),
		at: p.datetime().defaultRaw('now()'),
		// Null for the system itself (seed, scheduled jobs).
		actor: p.manyToOne(UserSchema).nullable(),
		action: p.string().length(100),
		entityType: p.string().length(100),
		entityId: p.string().length(100),
		before: p.json<Record<string, unknown>>().nullable(),
		after: p.json<Record<string, unknown>>().nullable()
	},
	indexes: [{ properties: ['entityType', 'entityId'] }, { properties: ['at'] }]
});

export type AuditEvent = InferEntity<typeof AuditEventSchema>;
