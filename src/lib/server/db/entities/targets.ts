import { p } from '@mikro-orm/core';
import type { Targets } from '../../../compliance/criteria';
import { THRESHOLD_INTEGER_DIGITS, THRESHOLD_SCALE } from '../../../registry/limits';

/**
 * The threshold columns shared by a requirement version (its targets) and a deviation (its
 * relaxed values), named after the fields of `Targets` so rows map onto the verdict rules with no
 * renaming. numeric(20, 9) keeps every value exactly as typed (read back as a decimal string,
 * compared with decimal.js); nine decimals reach nanoseconds of delay margin.
 */
export const TARGET_KEYS = [
	'minUpperGainMarginDb',
	'minLowerGainMarginDb',
	'minPhaseMarginDeg',
	'minDelayMarginSeconds',
	'minDelayMarginSamples',
	'minModulusMargin',
	'maxPeakSensitivity',
	'minDiskGainMarginDb',
	'crossoverMinHz',
	'crossoverMaxHz'
] as const satisfies readonly (keyof Targets)[];
export type TargetKey = (typeof TARGET_KEYS)[number];

const threshold = () =>
	p.decimal('string').precision(THRESHOLD_INTEGER_DIGITS + THRESHOLD_SCALE).scale(THRESHOLD_SCALE).nullable();

/** Fresh property builders (one set per entity: builders carry per-property options). */
export function thresholdColumns() {
	return {
		minUpperGainMarginDb: threshold(),
		minLowerGainMarginDb: threshold(),
		minPhaseMarginDeg: threshold(),
		minDelayMarginSeconds: threshold(),
		minDelayMarginSamples: threshold(),
		minModulusMargin: threshold(),
		maxPeakSensitivity: threshold(),
		minDiskGainMarginDb: threshold(),
		crossoverMinHz: threshold(),
		crossoverMaxHz: threshold()
	};
}

const column = (key: string) => key.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

/**
 * Range checks the database enforces on those columns, whatever writes them: every threshold is
 * positive (the lower gain margin is a magnitude), a peak sensitivity below 1 is impossible for a
 * strictly proper loop, and a crossover band must not be empty. NULL (no target) passes.
 */
export function thresholdChecks(table: string) {
	const positive = TARGET_KEYS.filter((k) => k !== 'maxPeakSensitivity').map((k) => ({
		name: `${table}_${column(k)}_positive`,
		expression: `${column(k)} > 0`
	}));
	return [
		...positive,
		{ name: `${table}_max_peak_sensitivity_at_least_one`, expression: 'max_peak_sensitivity >= 1' },
		{ name: `${table}_crossover_band_order`, expression: 'crossover_max_hz > crossover_min_hz' }
	];
}

export const nonEmpty = (table: string, col: string) => ({
	name: `${table}_${col}_not_blank`,
	expression: `btrim(${col}) <> ''`
});
