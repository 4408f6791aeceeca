/** Shared by the margin-engine unit tests: models go in as file text, like every real caller's. */
import { expect } from 'vitest';
import {
	computeMargins,
	parseModelText,
	type CaseResult,
	type LoopModel
} from '../../../src/lib/margins/index';

export const FORMAT = 'headroom-loop-model/1';
export const TWO_PI = 2 * Math.PI;
/** Engine Hz → rad/s (the sources print rad/s). */
export const rad = (hz: number | null | undefined) => (typeof hz === 'number' ? hz * TWO_PI : hz);
export const dB = (ratio: number) => 20 * Math.log10(ratio);
export const ratioOf = (db: number | null | undefined) =>
	typeof db === 'number' ? 10 ** (db / 20) : db;

export function model(m: Record<string, unknown>): LoopModel {
	const parsed = parseModelText(JSON.stringify({ format: FORMAT, ...m }));
	if (!parsed.ok) throw new Error(`refused: ${parsed.issue.message}`);
	return parsed.model;
}

export function caseOf(
	m: Record<string, unknown>,
	options?: { gainScale?: number },
	index = 0
): CaseResult {
	return computeMargins(model(m), options).cases[index];
}

/** One polynomial block, descending coefficients. */
export const poly = (
	numerator: number[],
	denominator: number[],
	extra: Record<string, unknown> = {}
) => ({
	type: 'polynomial',
	numerator,
	denominator,
	...extra
});

export const loop = (
	numerator: number[],
	denominator: number[],
	extra: Record<string, unknown> = {}
) => ({
	blocks: [poly(numerator, denominator)],
	...extra
});

export function conv(a: number[], b: number[]): number[] {
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	a.forEach((x, i) => b.forEach((y, j) => (out[i + j] += x * y)));
	return out;
}

export function near(
	actual: number | null | undefined,
	expected: number,
	tol: number,
	what = 'value'
): void {
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
	what = 'value'
) => near(actual, expected, rel * Math.abs(expected), what);

/** Complex L(jω) of a continuous num/den (descending) — evaluated here, not by the engine. */
export function tf(num: number[], den: number[], delay = 0): (w: number) => [number, number] {
	const val = (p: number[], w: number): [number, number] => {
		let re = 0;
		let im = 0;
		for (const c of p) [re, im] = [-im * w + c, re * w];
		return [re, im];
	};
	return (w) => {
		const [a, b] = val(num, w);
		const [c, d] = val(den, w);
		const m = c * c + d * d;
		let [re, im] = [(a * c + b * d) / m, (b * c - a * d) / m];
		if (delay)
			[re, im] = [
				re * Math.cos(w * delay) + im * Math.sin(w * delay),
				im * Math.cos(w * delay) - re * Math.sin(w * delay)
			];
		return [re, im];
	};
}

/** Brute force: sign changes of ln|L| and of Im L (Re < 0) on a dense log grid, refined by bisection. */
export function denseCrossings(
	L: (w: number) => [number, number],
	lo: number,
	hi: number,
	perDecade = 4000
) {
	const ws: number[] = [];
	for (let w = lo; w < hi; w *= 10 ** (1 / perDecade)) ws.push(w);
	const mag = (w: number) => Math.log(Math.hypot(...L(w)));
	const sin = (w: number) => {
		const [re, im] = L(w);
		return im / Math.hypot(re, im);
	};
	const bisect = (f: (w: number) => number, a: number, b: number) => {
		const fa = Math.sign(f(a));
		for (let i = 0; i < 100; i++) {
			const m = (a + b) / 2;
			if (Math.sign(f(m)) === fa) a = m;
			else b = m;
		}
		return (a + b) / 2;
	};
	const gain: number[] = [];
	const phase: number[] = [];
	for (let i = 0; i + 1 < ws.length; i++) {
		if (Math.sign(mag(ws[i])) !== Math.sign(mag(ws[i + 1])))
			gain.push(bisect(mag, ws[i], ws[i + 1]));
		const [a, b] = [L(ws[i]), L(ws[i + 1])];
		if (Math.sign(a[1]) !== Math.sign(b[1]) && (a[0] < 0 || b[0] < 0)) {
			const w = bisect(sin, ws[i], ws[i + 1]);
			if (L(w)[0] < 0) phase.push(w);
		}
	}
	return { gain, phase };
}
