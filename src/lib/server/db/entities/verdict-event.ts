import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { VERDICTS, type CriterionResult } from '../../../compliance/judge';
import { LoopSchema } from './loop';
import { RevisionSchema } from './revision';
import { RequirementSchema } from './requirement';
import { VerdictDigestSchema } from './verdict-digest';

/**
 * A change of a loop's verdict: the history behind the dashboard, and the outbox of verdict
 * e-mails (`notifiedAt` stays empty until the message went out, so a mail outage loses nothing).
 */
export const VerdictEventSchema = defineEntity({
	name: 'VerdictEvent',
	tableName: 'verdict_event',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		loop: p.manyToOne(LoopSchema),
		verdict: p.enum([...VERDICTS]),
		previousVerdict: p.enum([...VERDICTS]),
		revision: p.manyToOne(RevisionSchema).nullable(),
		requirement: p.manyToOne(RequirementSchema).nullable(),
		failing: p.array<string>(),
		criteria: p.json<CriterionResult[]>(),
		/** What caused the re-judgement: a revision, a target version, a deviation change. */
		cause: p.string().length(40),
		at: p.datetime().defaultRaw('now()'),
		worse: p.boolean(),
		notifiedAt: p.datetime().nullable(),
		/** The daily digest that listed this change to the class's lead (when the lead chose one). */
		digest: p.manyToOne(VerdictDigestSchema).nullable()
	},
	indexes: [
		{ properties: ['loop', 'at'] },
		{ name: 'verdict_event_outbox', properties: ['worse', 'notifiedAt'] }
	]
});

export type VerdictEvent = InferEntity<typeof VerdictEventSchema>;

export { VERDICT_RANK } from '../../../compliance/judge';
