import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
// Relative, not $lib: the MikroORM CLI and tsx scripts load entities without SvelteKit's aliases.
import { ROLES, type Role } from '../../../auth/roles';

import { VERDICT_MAIL_MODES, type VerdictMailMode } from '../../../notifications';

export { ROLES, type Role, VERDICT_MAIL_MODES, type VerdictMailMode };

export const UserSchema = defineEntity({
	name: 'User',
	tableName: 'app_user',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		// Stored lower-cased (src/lib/server/auth/email.ts) so the unique constraint is case-blind.
		email: p.string().length(320).unique(),
		name: p.string().length(200),
		role: p.enum([...ROLES]).default('viewer'),
		// Argon2id hash; null for users who only sign in through single sign-on or were invited.
		// Lazy: ordinary queries (every request's user lookup) never load it; sign-in asks for it.
		passwordHash: p.text().nullable().lazy(true, false),
		active: p.boolean().default(true),
		createdAt: p.datetime().defaultRaw('now()'),
		lastSignInAt: p.datetime().nullable(),
		// Sessions signed in before this instant are void: set on deactivation and password change,
		// so reactivating an account does not revive a cookie stolen before.
		sessionsValidFrom: p.datetime().nullable(),
		// How a lead hears about the loops of their classes getting worse: a message per change,
		// or one daily digest. `verdictMailSince` is when the current choice began (null: always
		// immediate), so each change goes out one way or the other, never both, never neither.
		verdictMail: p.enum([...VERDICT_MAIL_MODES]).default('immediate'),
		verdictMailSince: p.datetime().nullable()
	}
});

export type User = InferEntity<typeof UserSchema>;
