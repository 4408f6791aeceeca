import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { UserSchema } from './user';

/** A kind of loop ("current loop"); its margin targets live in versioned requirements. */
export const LoopClassSchema = defineEntity({
	name: 'LoopClass',
	tableName: 'loop_class',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		key: p.string().length(64).unique(),
		name: p.string().length(200),
		description: p.text().default(''),
		// The controls lead people ask about this class; informational, any lead may edit targets.
		lead: p.manyToOne(UserSchema).nullable(),
		// When true, engineers may upload revisions to loops of this class they do not own
		// (shared rigs, bring-up teams); read by the revisions feature.
		openUploads: p.boolean().default(false),
		createdAt: p.datetime().defaultRaw('now()')
	},
	checks: [{ name: 'loop_class_key_format', expression: "key ~ '^[a-z0-9][a-z0-9._-]*$'" }]
});

export type LoopClass = InferEntity<typeof LoopClassSchema>;
