/**
 * Modulus margin min |1 + L| and the balanced disk margin's max |S − 1/2| = |1 − L| / (2|1 + L|):
 * a grid scan, then Brent refinement of the best few local extrema in ln f. The grid is the
 * caller's: it must already be dense where these functions have narrow features (near lightly
 * damped closed-loop poles).
 */
import { parabolicMin } from './brent';
import { sortSmall } from './small-sort';
import { filled } from './buffers';

export interface PointEval {
	at(f: number): void;
	/** re and im alone, as at() sets them, where an evaluator has a leaner way to them. */
	value?(f: number): void;
	re: number;
	im: number;
}

export interface EndPoint {
	f: number;
	re: number;
	im: number;
}

export interface Sensitivity {
	modulus: number;
	modulusF: number;
	/** max |S − 1/2| over the band and its ends. */
	half: number;
	halfF: number;
}

// squared: smooth at a minimum, where |1 + L| itself has a corner that parabolic steps cannot fit
const modulusOf = (re: number, im: number) => (1 + re) * (1 + re) + im * im;
/**
 * Refinement tolerance in ln f: a deep, narrow dip of |1 + L| (a long delay's spiral, a lightly
 * damped closed-loop pole) needs its position far below its own width.
 */
const REFINE_TOL = 1e-10;
const GOLDEN = 0.3819660112501051;

const halfOf = (re: number, im: number) => {
	const m = (1 + re) * (1 + re) + im * im;
	return m === 0 ? Infinity : ((1 - re) * (1 - re) + im * im) / (4 * m);
};

/** L on the grid, when the caller has it already. */
export interface GridValues {
	re: number[];
	im: number[];
}

/**
 * `refine`: how many local extrema are polished (those within `within`× of the best grid value);
 * a delay's spiral has many near-equal dips, a rational loop one or two.
 */
export function sensitivity(
	ev: PointEval,
	grid: number[],
	ends: EndPoint[],
	values?: GridValues,
	{ refine = 2, within = 1.2 } = {}
): Sensitivity {
	const n = grid.length;
	const mod = filled(n);
	const half = filled(n);
	for (let i = 0; i < n; i++) {
		if (!values) ev.at(grid[i]);
		const re = values ? values.re[i] : ev.re;
		const im = values ? values.im[i] : ev.im;
		mod[i] = modulusOf(re, im);
		half[i] = halfOf(re, im);
		if (Number.isNaN(mod[i])) mod[i] = Infinity;
		if (Number.isNaN(half[i])) half[i] = 0.25;
	}
	let bestMod = Infinity;
	let bestModF = NaN;
	let bestHalf = -Infinity;
	let bestHalfF = NaN;
	for (const e of ends) {
		const m = modulusOf(e.re, e.im);
		const h = halfOf(e.re, e.im);
		if (m < bestMod) {
			bestMod = m;
			bestModF = e.f;
		}
		if (h > bestHalf) {
			bestHalf = h;
			bestHalfF = e.f;
		}
	}
	const [m, mf] = refineExtrema(ev, grid, mod, 1, modulusOf, refine, within);
	if (m < bestMod) {
		bestMod = m;
		bestModF = mf;
	}
	const [h, hf] = refineExtrema(ev, grid, half, -1, halfOf, refine, within);
	if (h > bestHalf) {
		bestHalf = h;
		bestHalfF = hf;
	}
	return {
		modulus: Math.sqrt(bestMod),
		modulusF: bestModF,
		half: Math.sqrt(bestHalf),
		halfF: bestHalfF
	};
}

/** sign·of(L) at f = e^x, NaN read as the worst value. */
function objective(
	ev: PointEval,
	sign: number,
	of: (re: number, im: number) => number,
	x: number
): number {
	if (ev.value) ev.value(Math.exp(x));
	else ev.at(Math.exp(x));
	const y = sign * of(ev.re, ev.im);
	return Number.isNaN(y) ? Infinity : y;
}

/**
 * The smallest of sign·vals' best local minima, each refined in ln f; [sign·value, f].
 * (Module functions and inline arrows only: a bundler that keeps function names wraps every
 * named closure at each call.)
 */
function refineExtrema(
	ev: PointEval,
	grid: number[],
	vals: number[],
	sign: number,
	of: (re: number, im: number) => number,
	refine: number,
	within: number
): [number, number] {
	const n = grid.length;
	let best = Infinity;
	let bestF = NaN;
	const found = extrema(vals, sign, refine);
	const limit = found.length
		? sign * vals[found[0]] * (sign > 0 ? within * within : 1 / (within * within))
		: 0;
	for (const i of found) {
		if (i !== found[0] && sign * vals[i] > limit) continue;
		if (sign * vals[i] < best) {
			best = sign * vals[i];
			bestF = grid[i];
		}
		const a = Math.log(grid[Math.max(0, i - 1)]);
		const b = Math.log(grid[Math.min(n - 1, i + 1)]);
		if (!(b > a)) continue;
		let u: number;
		let v: number;
		if (i > 0 && i < n - 1)
			// an interior grid minimum already brackets
			[u, v] = parabolicMin(
				(x) => objective(ev, sign, of, x),
				a,
				sign * vals[i - 1],
				Math.log(grid[i]),
				sign * vals[i],
				b,
				sign * vals[i + 1],
				REFINE_TOL
			);
		else {
			// a band end: one probe at the golden point nearer the end. Below the end's value, it
			// brackets a minimum inside; otherwise the function rises from the end, whose grid value
			// stands (a blind search would only creep towards it, some forty evaluations)
			const end = sign * vals[i];
			const other = sign * vals[i === 0 ? 1 : n - 2];
			const g = i === 0 ? a + GOLDEN * (b - a) : b - GOLDEN * (b - a);
			const probe = objective(ev, sign, of, g);
			if (!(probe < end)) continue;
			const [fa, fb] = i === 0 ? [end, other] : [other, end];
			[u, v] = parabolicMin((x) => objective(ev, sign, of, x), a, fa, g, probe, b, fb, REFINE_TOL);
		}
		if (v < best) {
			best = v;
			bestF = Math.exp(u);
		}
	}
	return [sign * best, bestF];
}

/** Indices of the `count` smallest local minima of sign·values (band ends included). */
function extrema(values: number[], sign: number, count: number): number[] {
	const n = values.length;
	const idx: number[] = [];
	for (let i = 0; i < n; i++) {
		const v = sign * values[i];
		const left = i === 0 ? Infinity : sign * values[i - 1];
		const right = i === n - 1 ? Infinity : sign * values[i + 1];
		if (v <= left && v <= right && Number.isFinite(v)) idx.push(i);
	}
	sortSmall(idx, (a, b) => sign * values[a] - sign * values[b]);
	return idx.slice(0, count);
}
