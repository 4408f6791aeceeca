/** The loop history as the service, the JSON API and the page exchange it. */
import type { Verdict } from '../compliance/judge';
import type { Targets } from '../compliance/criteria';
import type { WorstCase } from '../margins/types';
import type { ModelSummary } from '../margins/summary';
import type { RevisionDiff, SideState } from './diff';

export interface HistoryRequirement {
	id: string;
	version: number;
	targets: Required<Targets>;
	reason: string;
	author: { id: string; name: string };
	/** When this version came into force (it was saved), and when the next one replaced it. */
	inForceFrom: string;
	inForceUntil: string | null;
}

export interface HistoryVerdict {
	verdict: Verdict;
	previousVerdict: Verdict;
	at: string;
	cause: string;
	failing: string[];
	/** The requirement version it was judged against. */
	requirementVersion: number | null;
	/** False when the revision did not change the verdict: this is the verdict it kept. */
	changed: boolean;
}

export interface HistoryRevision {
	id: string;
	number: number;
	state: SideState;
	note: string;
	fileName: string;
	sizeBytes: number | null;
	sha256: string | null;
	sha256Short: string | null;
	uploadedBy: { id: string; name: string } | null;
	uploadedAt: string;
	computedAt: string | null;
	error: { message: string; path: string } | null;
	engineVersion: string | null;
	/** The worst case over every operating case, once computed. */
	worstCase: WorstCase | null;
	caseNames: string[];
	/** The requirement version in force when the revision was judged (or uploaded, until then). */
	requirementVersion: number | null;
	/** The verdict the loop got when this revision was judged; null for rejected or pending ones. */
	verdict: HistoryVerdict | null;
	/** Later changes while this revision was the one judged (new targets, deviations, expiry). */
	laterVerdicts: HistoryVerdict[];
}

export interface LoopHistory {
	loop: {
		id: string;
		key: string;
		name: string;
		product: { key: string; name: string };
		class: { key: string; name: string };
	};
	/** Oldest first. */
	revisions: HistoryRevision[];
	/** Every requirement version of the loop's class, oldest first. */
	requirements: HistoryRequirement[];
}

export interface ComparedRevision {
	number: number;
	state: SideState;
	fileName: string;
	uploadedAt: string;
	summary: ModelSummary | null;
	/** Why the summary is missing, when it is. */
	summaryProblem: string | null;
}

export interface RevisionComparison {
	a: ComparedRevision;
	b: ComparedRevision;
	diff: RevisionDiff;
}
