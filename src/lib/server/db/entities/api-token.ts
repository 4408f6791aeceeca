import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { SCOPES, type Scope } from '../../../auth/roles';
import { UserSchema } from './user';

export { SCOPES, type Scope };

/**
 * A personal API token. The value (hr_…) is shown once; only its sha-256 is kept, and `hint`
 * (its first characters) lets the owner tell tokens apart. Revoked tokens stay listed.
 */
export const ApiTokenSchema = defineEntity({
	name: 'ApiToken',
	tableName: 'api_token',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		owner: p.manyToOne(UserSchema),
		name: p.string().length(100),
		tokenHash: p.string().length(64).unique(),
		hint: p.string().length(16),
		scopes: p.array<Scope>(),
		createdAt: p.datetime().defaultRaw('now()'),
		lastUsedAt: p.datetime().nullable(),
		revokedAt: p.datetime().nullable()
	}
});

export type ApiToken = InferEntity<typeof ApiTokenSchema>;
