import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { UserSchema } from './user';

/**
 * One lead's daily digest of verdicts that got worse in (since, until]: the outbox row of a digest
 * e-mail. Written together with its send job; `sentAt` stays empty until the message went out, so
 * a mail outage only delays it. The next digest starts where the last one ended.
 */
export const VerdictDigestSchema = defineEntity({
	name: 'VerdictDigest',
	tableName: 'verdict_digest',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		user: p.manyToOne(UserSchema),
		since: p.datetime(),
		until: p.datetime(),
		loopCount: p.integer(),
		createdAt: p.datetime().defaultRaw('now()'),
		sentAt: p.datetime().nullable()
	},
	indexes: [{ properties: ['user', 'until'] }],
	checks: [{ name: 'verdict_digest_window', expression: 'until > since' }]
});

export type VerdictDigest = InferEntity<typeof VerdictDigestSchema>;
