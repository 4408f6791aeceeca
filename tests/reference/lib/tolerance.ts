/**
 * Tolerances by mark and small comparison helpers for the check-values table: [form] tight,
 * [mem] loose; sources print rad/s while the engine reports Hz.
 */
import { expect } from 'vitest';
import { TWO_PI } from './engine';

export const FORM_REL = 1e-6;
export const FORM_ABS = 1e-6;
export const MEM_REL = 0.02;
export const MEM_DEG = 1;
export const dB = (ratio: number) => 20 * Math.log10(ratio);
export const deg = (rad: number) => (rad * 180) / Math.PI;

export function near(
	actual: number | null | undefined,
	expected: number,
	tol: number,
	what: string
) {
	expect(actual, `${what}: expected ${expected}, got ${actual}`).toBeTypeOf('number');
	expect(
		Math.abs((actual as number) - expected),
		`${what}: ${actual} vs ${expected} ± ${tol}`
	).toBeLessThanOrEqual(tol);
}
export const nearRel = (
	actual: number | null | undefined,
	expected: number,
	rel: number,
	what: string
) => near(actual, expected, rel * Math.abs(expected), what);
/** Engine Hz → rad/s, for comparison with the sources. */
export const rad = (hzValue: number | null | undefined) =>
	typeof hzValue === 'number' ? hzValue * TWO_PI : hzValue;
export const gainRatio = (db: number | null | undefined) =>
	typeof db === 'number' ? 10 ** (db / 20) : db;

export const zoh = (num: number[], den: number[], T: number) => ({
	format: 'headroom-loop-model/1',
	sampleTimeSeconds: T,
	blocks: [{ type: 'polynomial', numerator: num, denominator: den, domain: 's', discretize: 'zoh' }]
});
