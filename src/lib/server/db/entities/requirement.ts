import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { UserSchema } from './user';
import { LoopClassSchema } from './loop-class';
import { nonEmpty, thresholdChecks, thresholdColumns } from './targets';

/**
 * One version of a loop class's margin targets. Rows are never updated: a change is a new
 * version (1, 2, 3… per class) with its author, time and reason, and the highest version is the
 * one in force. Every criterion is optional (NULL = no target).
 */
export const RequirementSchema = defineEntity({
	name: 'Requirement',
	tableName: 'requirement',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		loopClass: p.manyToOne(LoopClassSchema),
		version: p.integer(),
		...thresholdColumns(),
		author: p.manyToOne(UserSchema),
		reason: p.text(),
		createdAt: p.datetime().defaultRaw('now()')
	},
	uniques: [{ name: 'requirement_class_version_unique', properties: ['loopClass', 'version'] }],
	checks: [
		...thresholdChecks('requirement'),
		{ name: 'requirement_version_positive', expression: 'version > 0' },
		nonEmpty('requirement', 'reason')
	]
});

export type Requirement = InferEntity<typeof RequirementSchema>;
