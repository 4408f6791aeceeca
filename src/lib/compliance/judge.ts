/**
 * Verdict rules: a loop's latest computed margins against the requirement version in force and
 * its active deviations. Pure and deterministic (the clock is an argument), so the worker, the
 * bulk re-judge and the browser's what-if view all reach the same verdict.
 */
import Decimal from 'decimal.js';
import type { MarginsResult } from '../margins/types';
import {
	CRITERIA,
	SOURCE_FIELD,
	TARGET_FIELDS,
	actualOf,
	crossoverSpan,
	type Criterion,
	type Targets
} from './criteria';

export const VERDICTS = [
	'compliant',
	'noncompliant',
	'covered',
	'unstable',
	'pending',
	'rejected',
	'empty'
] as const;
export type Verdict = (typeof VERDICTS)[number];

export interface DeviationInput {
	id: string;
	/** Relaxed targets: a field set here replaces the requirement's; null waives it. */
	relaxed: Targets;
	startsAt: Date;
	expiresAt: Date;
	revokedAt?: Date | null;
}

export type CriterionStatus = 'pass' | 'fail' | 'covered' | 'not-applicable';

export interface CriterionResult {
	criterion: Criterion;
	status: CriterionStatus;
	/** The threshold as stored, e.g. "45" (with `comparison` telling the direction). */
	required: string;
	comparison: 'at least' | 'at most' | 'within';
	actual: number | null;
	/** How far short of the requirement, as an exact decimal string; null when it passes. */
	shortfall: string | null;
	fromCase?: string;
	coveredBy?: string;
	relaxedTo?: string;
	note?: string;
}

export interface Judgement {
	verdict: Verdict;
	criteria: CriterionResult[];
	failing: Criterion[];
}

export type RevisionState = 'empty' | 'pending' | 'rejected' | 'computed';

export interface JudgeInput {
	/** 'computed' when `result` holds the latest computed revision's margins. */
	state: RevisionState;
	result?: MarginsResult | null;
	targets: Targets;
	deviations?: DeviationInput[];
	now: Date;
}

export function isActive(d: DeviationInput, now: Date): boolean {
	return !d.revokedAt && d.startsAt <= now && now < d.expiresAt;
}

const present = (v: string | null | undefined): v is string =>
	v !== null && v !== undefined && v !== '';
const short = (d: Decimal) => d.toSignificantDigits(6).toString();

/** One criterion against one set of targets; null when the targets say nothing about it. */
function check(
	criterion: Criterion,
	targets: Targets,
	result: MarginsResult
): Omit<CriterionResult, 'criterion'> | null {
	if (criterion === 'crossoverBand') return checkBand(targets, result);
	const field = TARGET_FIELDS[criterion][0];
	const threshold = targets[field];
	if (!present(threshold)) return null;
	const w = result.worstCase;
	const atMost = criterion === 'peakSensitivity';
	const base = {
		// Numeric columns read back with their full scale ("45.000000000"); show the value.
		required: new Decimal(threshold).toString(),
		comparison: atMost ? ('at most' as const) : ('at least' as const),
		fromCase: w.from[SOURCE_FIELD[criterion]]
	};
	if (!w.stable) {
		return { ...base, status: 'fail', actual: null, shortfall: null, note: 'closed loop unstable' };
	}
	const actual = actualOf(criterion, w);
	if (actual === null) {
		if (criterion === 'delayMarginSamples' && w.delayMarginSeconds !== null) {
			return {
				...base,
				status: 'not-applicable',
				actual,
				shortfall: null,
				note: 'continuous loop'
			};
		}
		// Unbounded: no crossover on that side, so no amount of that change destabilises the loop.
		return { ...base, status: 'pass', actual, shortfall: null, note: 'unbounded' };
	}
	const gap = atMost ? new Decimal(actual).minus(threshold) : new Decimal(threshold).minus(actual);
	return gap.gt(0)
		? { ...base, status: 'fail', actual, shortfall: short(gap) }
		: { ...base, status: 'pass', actual, shortfall: null };
}

function checkBand(
	targets: Targets,
	result: MarginsResult
): Omit<CriterionResult, 'criterion'> | null {
	const min = targets.crossoverMinHz;
	const max = targets.crossoverMaxHz;
	if (!present(min) && !present(max)) return null;
	const required = `${present(min) ? new Decimal(min).toString() : '0'}–${present(max) ? new Decimal(max).toString() : '∞'}`;
	const base = { required, comparison: 'within' as const };
	const span = crossoverSpan(result);
	if (!span)
		return { ...base, status: 'fail', actual: null, shortfall: null, note: 'no gain crossover' };
	const below = present(min) ? new Decimal(min).minus(span.low) : new Decimal(0);
	const above = present(max) ? new Decimal(span.high).minus(max) : new Decimal(0);
	if (below.gt(0)) {
		return {
			...base,
			status: 'fail',
			actual: span.low,
			shortfall: short(below),
			fromCase: span.lowCase
		};
	}
	if (above.gt(0)) {
		return {
			...base,
			status: 'fail',
			actual: span.high,
			shortfall: short(above),
			fromCase: span.highCase
		};
	}
	return { ...base, status: 'pass', actual: span.low, shortfall: null, fromCase: span.lowCase };
}

function relaxedLabel(criterion: Criterion, relaxed: Targets): string {
	return TARGET_FIELDS[criterion]
		.map((f) => (present(relaxed[f]) ? relaxed[f] : relaxed[f] === null ? 'waived' : '—'))
		.join('–');
}

/** Judge one loop. */
export function judge(input: JudgeInput): Judgement {
	if (input.state !== 'computed' || !input.result) {
		const verdict: Verdict = input.state === 'computed' ? 'pending' : input.state;
		return { verdict, criteria: [], failing: [] };
	}
	const result = input.result;
	const active = (input.deviations ?? []).filter((d) => isActive(d, input.now));
	const criteria: CriterionResult[] = [];
	for (const criterion of CRITERIA) {
		const outcome = check(criterion, input.targets, result);
		if (!outcome) continue;
		const row: CriterionResult = { criterion, ...outcome };
		if (row.status === 'fail' && result.worstCase.stable)
			coverByDeviation(row, input.targets, active, result);
		criteria.push(row);
	}
	const failing = criteria.filter((c) => c.status === 'fail').map((c) => c.criterion);
	let verdict: Verdict;
	if (!result.worstCase.stable) verdict = 'unstable';
	else if (failing.length) verdict = 'noncompliant';
	else if (criteria.some((c) => c.status === 'covered')) verdict = 'covered';
	else verdict = 'compliant';
	return { verdict, criteria, failing };
}

/** A deviation covers a shortfall when the actual value meets the relaxed target. */
function coverByDeviation(
	row: CriterionResult,
	targets: Targets,
	active: DeviationInput[],
	result: MarginsResult
) {
	const fields = TARGET_FIELDS[row.criterion];
	for (const d of active) {
		if (!fields.some((f) => f in d.relaxed)) continue;
		const relaxedTargets: Targets = { ...targets };
		for (const f of fields) if (f in d.relaxed) relaxedTargets[f] = d.relaxed[f];
		const again = check(row.criterion, relaxedTargets, result);
		if (!again || again.status === 'pass' || again.status === 'not-applicable') {
			row.status = 'covered';
			row.coveredBy = d.id;
			row.relaxedTo = relaxedLabel(row.criterion, d.relaxed);
			return;
		}
	}
}

/** Verdicts from best to worst, to tell whether a change made things worse (and to sort by). */
export const VERDICT_RANK: Record<Verdict, number> = {
	compliant: 0,
	covered: 1,
	empty: 2,
	pending: 2,
	rejected: 3,
	noncompliant: 4,
	unstable: 5
};
