/**
 * What a rendered report is made of: everything frozen at render time, so the PDF, the CSV and
 * the export row say the same thing. Pure data (no ORM types), built by the render job.
 */
import type { Criterion, Targets } from '../compliance/criteria';
import type { CriterionResult, Verdict } from '../compliance/judge';
import type { ReportFilters, ReportFormat } from './filters';

export interface FrozenRequirement {
	classKey: string;
	className: string;
	requirementId: string;
	version: number;
	targets: Targets;
}

export interface FrozenRevision {
	id: string;
	number: number;
	sha256: string | null;
	objectKey: string;
	fileName: string;
}

export interface ReportLoop {
	id: string;
	key: string;
	name: string;
	product: { key: string; name: string };
	class: { key: string; name: string };
	owner: { name: string; email: string };
	tags: string[];
	verdict: Verdict;
	judgedAt: string | null;
	/** The requirement version the verdict was judged against (null before any judgement). */
	requirement: { id: string; version: number; targets: Targets } | null;
	revision: FrozenRevision | null;
	criteria: CriterionResult[];
	failing: Criterion[];
	activeDeviations: number;
}

export interface ReportData {
	id: string;
	format: ReportFormat;
	filters: ReportFilters;
	generatedAt: string;
	requestedBy: { name: string; email: string };
	engineVersion: string;
	/** The version in force per class of the loops in the report, at render time. */
	requirements: FrozenRequirement[];
	loops: ReportLoop[];
}
