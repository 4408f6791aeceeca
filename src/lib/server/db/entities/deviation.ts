import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { CRITERIA, type Criterion } from '../../../compliance/criteria';
import { UserSchema } from './user';
import { LoopSchema } from './loop';
import { nonEmpty, thresholdChecks, thresholdColumns } from './targets';

/**
 * A lead's time-limited relaxation of some criteria on one loop. Each listed criterion takes the
 * relaxed value from its column(s); a listed criterion whose column is NULL is waived. Revoking
 * keeps the row (with who and when) so the history of what covered a shortfall stays readable.
 */
export const DeviationSchema = defineEntity({
	name: 'Deviation',
	tableName: 'deviation',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		loop: p.manyToOne(LoopSchema),
		criteria: p.array<Criterion>(),
		...thresholdColumns(),
		reason: p.text(),
		approvedBy: p.manyToOne(UserSchema),
		startsAt: p.datetime(),
		expiresAt: p.datetime(),
		revokedAt: p.datetime().nullable(),
		revokedBy: p.manyToOne(UserSchema).nullable(),
		createdAt: p.datetime().defaultRaw('now()'),
		/** Set by the expiry job once the loop was judged again after this deviation lapsed. */
		expiryProcessedAt: p.datetime().nullable(),
		/**
		 * Set once the loop was judged with this deviation in force: at the grant when it starts at
		 * once, by the scheduled pass when its start lies in the future.
		 */
		startProcessedAt: p.datetime().nullable()
	},
	indexes: [{ properties: ['loop'] }, { properties: ['expiresAt'] }],
	checks: [
		...thresholdChecks('deviation'),
		nonEmpty('deviation', 'reason'),
		{ name: 'deviation_expires_after_start', expression: 'expires_at > starts_at' },
		{ name: 'deviation_criteria_not_empty', expression: 'cardinality(criteria) > 0' },
		{
			name: 'deviation_criteria_known',
			expression: `criteria <@ array[${CRITERIA.map((c) => `'${c}'`).join(', ')}]::text[]`
		},
		{
			name: 'deviation_revoked_by_whom',
			expression: '(revoked_at is null) = (revoked_by_id is null)'
		}
	]
});

export type Deviation = InferEntity<typeof DeviationSchema>;
