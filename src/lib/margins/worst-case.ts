/**
 * Worst case over operating cases. `null` means "no limit" (an unbounded gain margin, no gain
 * crossover), which is the best a figure can be, so the worst case is the worst non-null value and
 * is null only when every case has none. The exception is instability: when any case is unstable
 * the worst case is unstable and has no gain, delay or disk margin at all (null, `from` naming
 * that case), because an unstable case has no margin, not an unlimited one.
 */
import type { CaseResult, MarginFigures, WorstCase, WorstCaseSource } from './types';

type Key = keyof MarginFigures;

/** The case minimising score among those where the figure exists. */
function pick(
	cases: CaseResult[],
	has: (c: CaseResult) => boolean,
	score: (c: CaseResult) => number
): CaseResult | null {
	let best: CaseResult | null = null;
	for (const c of cases) if (has(c) && (!best || score(c) < score(best))) best = c;
	return best;
}

/** Copies the figures `keys` of case c (when there is one) into out, naming c as their source. */
function take(out: WorstCase, from: WorstCaseSource, c: CaseResult | null, keys: Key[]): void {
	if (!c) return;
	for (const k of keys) {
		(out as unknown as Record<string, unknown>)[k] = c[k];
		from[k] = c.name;
	}
}

export function worstCase(cases: CaseResult[]): WorstCase {
	const from: WorstCaseSource = {};
	const unstable = cases.find((c) => !c.stable) ?? null;
	const mostPoles = pick(
		cases,
		() => true,
		(c) => -c.unstablePoles
	);
	const out: WorstCase = {
		stable: unstable === null,
		unstablePoles: mostPoles?.unstablePoles ?? 0,
		upperGainMarginDb: null,
		upperGainMarginHz: null,
		lowerGainMarginDb: null,
		lowerGainMarginHz: null,
		phaseMarginDeg: null,
		phaseMarginHz: null,
		delayMarginSeconds: null,
		delayMarginSamples: null,
		modulusMargin: null,
		peakSensitivity: null,
		peakSensitivityHz: null,
		diskMargin: null,
		from
	};
	if (unstable) {
		from.stable = unstable.name;
		for (const k of [
			'upperGainMarginDb',
			'upperGainMarginHz',
			'lowerGainMarginDb',
			'lowerGainMarginHz',
			'delayMarginSeconds',
			'delayMarginSamples',
			'diskMargin'
		] as Key[])
			from[k] = unstable.name;
	} else {
		take(
			out,
			from,
			pick(
				cases,
				(c) => c.upperGainMarginDb !== null,
				(c) => c.upperGainMarginDb as number
			),
			['upperGainMarginDb', 'upperGainMarginHz']
		);
		take(
			out,
			from,
			pick(
				cases,
				(c) => c.lowerGainMarginDb !== null,
				(c) => -(c.lowerGainMarginDb as number)
			),
			['lowerGainMarginDb', 'lowerGainMarginHz']
		);
		take(
			out,
			from,
			pick(
				cases,
				(c) => c.delayMarginSeconds !== null,
				(c) => c.delayMarginSeconds as number
			),
			['delayMarginSeconds', 'delayMarginSamples']
		);
		take(
			out,
			from,
			pick(
				cases,
				(c) => c.diskMargin !== null,
				(c) => c.diskMargin!.alpha
			),
			['diskMargin']
		);
	}
	if (mostPoles && mostPoles.unstablePoles > 0) from.unstablePoles = mostPoles.name;
	take(
		out,
		from,
		pick(
			cases,
			(c) => c.phaseMarginDeg !== null,
			(c) => Math.abs(c.phaseMarginDeg as number)
		),
		['phaseMarginDeg', 'phaseMarginHz']
	);
	take(
		out,
		from,
		pick(
			cases,
			(c) => c.modulusMargin !== null,
			(c) => c.modulusMargin as number
		),
		['modulusMargin', 'peakSensitivity', 'peakSensitivityHz']
	);
	return out;
}
