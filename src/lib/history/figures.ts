/**
 * The margin figures the history compares and charts, and how each one reads: its unit, which
 * way is better, what `null` means for it, and whether a change is told in units or in percent.
 */
import type { CaseResult, MarginFigures, WorstCase } from '../margins/types';
import type { Unit } from './format';

export type FigureKey =
	| 'upperGainMarginDb'
	| 'lowerGainMarginDb'
	| 'phaseMarginDeg'
	| 'delayMarginSeconds'
	| 'delayMarginSamples'
	| 'modulusMargin'
	| 'peakSensitivity'
	| 'diskGainDb'
	| 'diskPhaseDeg'
	| 'crossoverLowHz'
	| 'crossoverHighHz';

export interface FigureInfo {
	key: FigureKey;
	label: string;
	unit: Unit;
	/** 'higher' or 'lower' is better; 'neither' for frequencies (a move is neither good nor bad). */
	better: 'higher' | 'lower' | 'neither';
	/** How a change is told: in the figure's unit (dB, °) or in percent (seconds, ratios, Hz). */
	change: 'absolute' | 'relative';
	/** What a null value means for this figure on a stable loop. */
	whenNull: 'unbounded' | 'no crossover' | 'none';
	/** Words for the value going up and down (lower gain margins are negative: down is wider). */
	verbs: [up: string, down: string];
	/** The worst case's `from` entry naming the case the figure came from. */
	source?: keyof WorstCase['from'];
}

const f = (info: Omit<FigureInfo, 'verbs'> & { verbs?: [string, string] }): FigureInfo => ({
	verbs: ['rose', 'fell'],
	...info
});

export const FIGURES: FigureInfo[] = [
	f({
		key: 'phaseMarginDeg',
		label: 'phase margin',
		unit: 'deg',
		better: 'higher',
		change: 'absolute',
		whenNull: 'no crossover',
		source: 'phaseMarginDeg'
	}),
	f({
		key: 'upperGainMarginDb',
		label: 'upper gain margin',
		unit: 'dB',
		better: 'higher',
		change: 'absolute',
		whenNull: 'unbounded',
		source: 'upperGainMarginDb'
	}),
	f({
		key: 'lowerGainMarginDb',
		label: 'lower gain margin',
		unit: 'dB',
		better: 'lower',
		change: 'absolute',
		whenNull: 'unbounded',
		verbs: ['narrowed', 'widened'],
		source: 'lowerGainMarginDb'
	}),
	f({
		key: 'delayMarginSeconds',
		label: 'delay margin',
		unit: 's',
		better: 'higher',
		change: 'relative',
		whenNull: 'no crossover',
		source: 'delayMarginSeconds'
	}),
	f({
		key: 'delayMarginSamples',
		label: 'delay margin in samples',
		unit: 'samples',
		better: 'higher',
		change: 'relative',
		whenNull: 'none',
		source: 'delayMarginSamples'
	}),
	f({
		key: 'modulusMargin',
		label: 'modulus margin',
		unit: '',
		better: 'higher',
		change: 'relative',
		whenNull: 'none',
		source: 'modulusMargin'
	}),
	f({
		key: 'peakSensitivity',
		label: 'peak sensitivity Ms',
		unit: '',
		better: 'lower',
		change: 'relative',
		whenNull: 'none',
		source: 'peakSensitivity'
	}),
	f({
		key: 'diskGainDb',
		label: 'disk gain margin',
		unit: 'dB',
		better: 'higher',
		change: 'absolute',
		whenNull: 'unbounded',
		source: 'diskMargin'
	}),
	f({
		key: 'diskPhaseDeg',
		label: 'disk phase margin',
		unit: 'deg',
		better: 'higher',
		change: 'absolute',
		whenNull: 'none',
		source: 'diskMargin'
	}),
	f({
		key: 'crossoverLowHz',
		label: 'lowest gain crossover',
		unit: 'Hz',
		better: 'neither',
		change: 'relative',
		whenNull: 'no crossover',
		verbs: ['moved up', 'moved down']
	}),
	f({
		key: 'crossoverHighHz',
		label: 'highest gain crossover',
		unit: 'Hz',
		better: 'neither',
		change: 'relative',
		whenNull: 'no crossover',
		verbs: ['moved up', 'moved down']
	})
];

export const FIGURE_INFO = Object.fromEntries(FIGURES.map((x) => [x.key, x])) as Record<
	FigureKey,
	FigureInfo
>;

/** Lowest and highest gain crossover over some cases. */
function crossovers(cases: Pick<CaseResult, 'gainCrossovers'>[]): [number | null, number | null] {
	const hz = cases.flatMap((c) => c.gainCrossovers.map((x) => x.hz));
	return hz.length ? [Math.min(...hz), Math.max(...hz)] : [null, null];
}

/** Every figure of one case, or of the worst case (whose crossovers span all its cases). */
export function figureValues(
	m: MarginFigures,
	casesForCrossovers: Pick<CaseResult, 'gainCrossovers'>[]
): Record<FigureKey, number | null> {
	const [low, high] = crossovers(casesForCrossovers);
	return {
		upperGainMarginDb: m.upperGainMarginDb,
		lowerGainMarginDb: m.lowerGainMarginDb,
		phaseMarginDeg: m.phaseMarginDeg,
		delayMarginSeconds: m.delayMarginSeconds,
		delayMarginSamples: m.delayMarginSamples,
		modulusMargin: m.modulusMargin,
		peakSensitivity: m.peakSensitivity,
		diskGainDb: m.diskMargin?.gainDb ?? null,
		diskPhaseDeg: m.diskMargin?.phaseDeg ?? null,
		crossoverLowHz: low,
		crossoverHighHz: high
	};
}
