import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

export const ROLES = ['viewer', 'engineer', 'lead', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const UserSchema = defineEntity({
	name: 'User',
	tableName: 'app_user',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		email: p.string().length(320).unique(),
		name: p.string().length(200),
		role: p.enum(ROLES).default('viewer'),
		// Argon2id hash; null for users who only sign in through single sign-on or were invited.
		passwordHash: p.text().nullable().hidden(),
		active: p.boolean().default(true),
		createdAt: p.datetime().defaultRaw('now()'),
		lastSignInAt: p.datetime().nullable()
	}
});

export type User = InferEntity<typeof UserSchema>;
