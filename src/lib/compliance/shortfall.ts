/**
 * How far a judged loop falls short, across criteria with different units: each shortfall as a
 * fraction of the threshold it misses (2° short of 45° is 0.044), and the largest of them is the
 * loop's worst relative shortfall. The dashboard sorts on it to put the loops furthest from
 * their targets first. Pure: used by the judge job (stored on the loop row) and by tests.
 */
import Decimal from 'decimal.js';
import type { Criterion } from './criteria';
import type { CriterionResult, Judgement } from './judge';

/** Short of the target, whether or not a deviation covers it. */
export const fallsShort = (c: CriterionResult) => c.status === 'fail' || c.status === 'covered';

/** The criteria a judgement finds short of their target, covered or not. */
export const shortCriteria = (j: Judgement | null | undefined): Criterion[] =>
	(j?.criteria ?? []).filter(fallsShort).map((c) => c.criterion);

/**
 * One criterion's shortfall relative to its threshold. A shortfall that cannot be measured
 * (unstable closed loop, no gain crossover) counts as the whole target missing: 1.
 */
export function relativeShortfall(c: CriterionResult): number | null {
	if (!fallsShort(c)) return null;
	if (c.shortfall === null) return 1;
	const gap = new Decimal(c.shortfall);
	let threshold: Decimal;
	if (c.comparison === 'within') {
		// "min–max" (a missing side is "0" or "∞"): the bound the actual value crossed.
		const [min, max] = c.required.split('–');
		threshold = c.actual !== null && max !== '∞' && c.actual > Number(max) ? new Decimal(max) : new Decimal(min);
	} else {
		threshold = new Decimal(c.required);
	}
	return threshold.abs().gt(0) ? gap.div(threshold.abs()).toNumber() : 1;
}

/** The largest relative shortfall of a judgement; null when nothing falls short. */
export function worstShortfall(j: Judgement | null | undefined): number | null {
	let worst: number | null = null;
	for (const c of j?.criteria ?? []) {
		const r = relativeShortfall(c);
		if (r !== null && (worst === null || r > worst)) worst = r;
	}
	return worst;
}
