import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

/**
 * One password sign-in attempt, for rate limiting in PostgreSQL: web servers are stateless and
 * several replicas run, so a counter in memory would reset per replica and per restart. The
 * e-mail is kept whether or not an account exists, so the limit itself reveals nothing.
 */
export const SignInAttemptSchema = defineEntity({
	name: 'SignInAttempt',
	tableName: 'sign_in_attempt',
	properties: {
		id: p.bigint('string').primary().autoincrement(),
		email: p.string().length(320),
		address: p.string().length(64),
		succeeded: p.boolean().default(false),
		at: p.datetime().defaultRaw('now()')
	},
	indexes: [{ properties: ['email', 'at'] }, { properties: ['address', 'at'] }]
});

export type SignInAttempt = InferEntity<typeof SignInAttemptSchema>;
