/**
 * The criteria a loop class can set targets for, and how each reads its actual value off a
 * margins result. Thresholds are decimal strings (exact, from numeric columns); actual values are
 * the engine's binary floats, converted exactly by decimal.js before any comparison.
 */
import type { MarginsResult, WorstCase } from '../margins/types';

export const CRITERIA = [
	'upperGainMargin',
	'lowerGainMargin',
	'phaseMargin',
	'delayMarginSeconds',
	'delayMarginSamples',
	'modulusMargin',
	'peakSensitivity',
	'diskGainMargin',
	'crossoverBand'
] as const;
export type Criterion = (typeof CRITERIA)[number];

/** Targets of one requirement version; null or absent = no target for that criterion. */
export interface Targets {
	minUpperGainMarginDb?: string | null;
	/** A magnitude in dB: the lower gain margin must reach at least this far below 0 dB. */
	minLowerGainMarginDb?: string | null;
	minPhaseMarginDeg?: string | null;
	minDelayMarginSeconds?: string | null;
	minDelayMarginSamples?: string | null;
	minModulusMargin?: string | null;
	maxPeakSensitivity?: string | null;
	minDiskGainMarginDb?: string | null;
	crossoverMinHz?: string | null;
	crossoverMaxHz?: string | null;
}

export const CRITERION_LABELS: Record<Criterion, string> = {
	upperGainMargin: 'Upper gain margin',
	lowerGainMargin: 'Lower gain margin',
	phaseMargin: 'Phase margin',
	delayMarginSeconds: 'Delay margin',
	delayMarginSamples: 'Delay margin (samples)',
	modulusMargin: 'Modulus margin',
	peakSensitivity: 'Peak sensitivity',
	diskGainMargin: 'Disk gain margin',
	crossoverBand: 'Crossover band'
};

export const CRITERION_UNITS: Record<Criterion, string> = {
	upperGainMargin: 'dB',
	lowerGainMargin: 'dB',
	phaseMargin: '°',
	delayMarginSeconds: 's',
	delayMarginSamples: 'samples',
	modulusMargin: '',
	peakSensitivity: '',
	diskGainMargin: 'dB',
	crossoverBand: 'Hz'
};

/** Which target field(s) belong to a criterion. */
export const TARGET_FIELDS: Record<Criterion, (keyof Targets)[]> = {
	upperGainMargin: ['minUpperGainMarginDb'],
	lowerGainMargin: ['minLowerGainMarginDb'],
	phaseMargin: ['minPhaseMarginDeg'],
	delayMarginSeconds: ['minDelayMarginSeconds'],
	delayMarginSamples: ['minDelayMarginSamples'],
	modulusMargin: ['minModulusMargin'],
	peakSensitivity: ['maxPeakSensitivity'],
	diskGainMargin: ['minDiskGainMarginDb'],
	crossoverBand: ['crossoverMinHz', 'crossoverMaxHz']
};

/**
 * The actual value a criterion is judged on, from the worst case. `null` means the margin is
 * unbounded on that side (no phase crossover, no gain crossover): nothing can be lost there.
 */
export function actualOf(criterion: Exclude<Criterion, 'crossoverBand'>, w: WorstCase): number | null {
	switch (criterion) {
		case 'upperGainMargin':
			return w.upperGainMarginDb;
		case 'lowerGainMargin':
			// Reported negative (e.g. −8 dB); compared as a magnitude against a positive target.
			return w.lowerGainMarginDb === null ? null : -w.lowerGainMarginDb;
		case 'phaseMargin':
			// A negative phase margin on a stable loop is as far from −1 as a positive one.
			return w.phaseMarginDeg === null ? null : Math.abs(w.phaseMarginDeg);
		case 'delayMarginSeconds':
			return w.delayMarginSeconds;
		case 'delayMarginSamples':
			return w.delayMarginSamples;
		case 'modulusMargin':
			return w.modulusMargin;
		case 'peakSensitivity':
			return w.peakSensitivity;
		case 'diskGainMargin':
			return w.diskMargin === null ? null : w.diskMargin.gainDb;
	}
}

/** Lowest and highest gain crossover over every case, in Hz; null without any crossover. */
export function crossoverSpan(result: MarginsResult): { low: number; high: number; lowCase: string; highCase: string } | null {
	let span: { low: number; high: number; lowCase: string; highCase: string } | null = null;
	for (const c of result.cases) {
		for (const x of c.gainCrossovers) {
			if (!span) span = { low: x.hz, high: x.hz, lowCase: c.name, highCase: c.name };
			if (x.hz < span.low) Object.assign(span, { low: x.hz, lowCase: c.name });
			if (x.hz > span.high) Object.assign(span, { high: x.hz, highCase: c.name });
		}
	}
	return span;
}

/** The worst-case field whose `from` names the case a criterion's actual value came from. */
export const SOURCE_FIELD: Record<Exclude<Criterion, 'crossoverBand'>, keyof WorstCase['from']> = {
	upperGainMargin: 'upperGainMarginDb',
	lowerGainMargin: 'lowerGainMarginDb',
	phaseMargin: 'phaseMarginDeg',
	delayMarginSeconds: 'delayMarginSeconds',
	delayMarginSamples: 'delayMarginSamples',
	modulusMargin: 'modulusMargin',
	peakSensitivity: 'peakSensitivity',
	diskGainMargin: 'diskMargin'
};
