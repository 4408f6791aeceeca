import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { REPORT_FORMATS, type ReportFilters } from '../../../reports/filters';
import type { Verdict } from '../../../compliance/judge';
import type { FrozenRequirement } from '../../../reports/types';
import { UserSchema } from './user';

/**
 * One requested compliance report (PDF or CSV). `queued` (render job enqueued in the same
 * transaction) → `rendering` → `ready` (file in S3 under a key the server chose) or `failed`
 * (message kept; a retry may still turn it ready). What the render used is frozen on the row:
 * the requirement version in force per class, and per loop the judged revision with its sha-256,
 * so an auditor can tell months later exactly which evidence the file holds.
 */
export const REPORT_STATES = ['queued', 'rendering', 'ready', 'failed'] as const;
export type ReportState = (typeof REPORT_STATES)[number];

/** Per loop in the report: the judgement it shows. */
export interface FrozenLoopEvidence {
	loopId: string;
	loopKey: string;
	productKey: string;
	verdict: Verdict;
	requirementId: string | null;
	revisionId: string | null;
	revisionNumber: number | null;
	sha256: string | null;
}

export const ReportExportSchema = defineEntity({
	name: 'ReportExport',
	tableName: 'report_export',
	properties: {
		id: p.uuid().primary(),
		format: p.enum([...REPORT_FORMATS]),
		state: p.enum([...REPORT_STATES]).default('queued'),
		filters: p.json<ReportFilters>(),
		requestedBy: p.manyToOne(UserSchema),
		requestedAt: p.datetime().defaultRaw('now()'),
		startedAt: p.datetime().nullable(),
		finishedAt: p.datetime().nullable(),
		errorMessage: p.text().nullable(),
		attempts: p.integer().default(0),
		objectKey: p.string().length(200).unique(),
		sizeBytes: p.integer().nullable(),
		sha256: p.string().length(64).nullable(),
		engineVersion: p.string().length(40).nullable(),
		loopCount: p.integer().nullable(),
		verdictCounts: p.json<Partial<Record<Verdict, number>>>().nullable(),
		requirements: p.json<FrozenRequirement[]>().nullable(),
		evidence: p.json<FrozenLoopEvidence[]>().nullable()
	},
	indexes: [{ name: 'report_export_requested_at_index', properties: ['requestedAt'] }],
	checks: [
		{
			name: 'report_export_failed_has_error',
			expression: "(state <> 'failed') or (error_message is not null)"
		},
		{
			name: 'report_export_ready_has_file',
			expression: "(state <> 'ready') or (size_bytes is not null and sha256 is not null)"
		}
	]
});

export type ReportExport = InferEntity<typeof ReportExportSchema>;
