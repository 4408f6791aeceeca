import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import type { MarginsResult } from '../../../margins/types';
import { RevisionSchema } from './revision';

/**
 * The engine's full result for one revision. One per revision (unique): a job that runs twice
 * after a crash cannot store two.
 */
export const MarginReportSchema = defineEntity({
	name: 'MarginReport',
	tableName: 'margin_report',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		revision: p.oneToOne(RevisionSchema).owner().unique(),
		engineVersion: p.string().length(40),
		result: p.json<MarginsResult>(),
		computeMs: p.double(),
		createdAt: p.datetime().defaultRaw('now()')
	}
});

export type MarginReport = InferEntity<typeof MarginReportSchema>;
