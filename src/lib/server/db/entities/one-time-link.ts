import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { UserSchema } from './user';

export const LINK_PURPOSES = ['invitation', 'password_reset'] as const;
export type LinkPurpose = (typeof LINK_PURPOSES)[number];

/**
 * A single-use, expiring link e-mailed to a person (invitation, password reset). Only the
 * sha-256 of the random value is stored: a copy of the database does not let anyone use a link.
 */
export const OneTimeLinkSchema = defineEntity({
	name: 'OneTimeLink',
	tableName: 'one_time_link',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		user: p.manyToOne(UserSchema),
		purpose: p.enum([...LINK_PURPOSES]),
		tokenHash: p.string().length(64).unique(),
		createdAt: p.datetime().defaultRaw('now()'),
		expiresAt: p.datetime(),
		usedAt: p.datetime().nullable(),
		createdBy: p.manyToOne(UserSchema).nullable()
	}
});

export type OneTimeLink = InferEntity<typeof OneTimeLinkSchema>;
