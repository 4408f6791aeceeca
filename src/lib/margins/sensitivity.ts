/**
 * Modulus margin min |1 + L| and the balanced disk margin's max |S − 1/2| = |1 − L| / (2|1 + L|):
 * a grid scan, then Brent refinement of the best few local extrema in ln f. The grid is the
 * caller's: it must already be dense where these functions have narrow features (near lightly
 * damped closed-loop poles).
 */
import { brentMin } from './brent';

export interface PointEval {
	at(f: number): void;
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

const modulusOf = (re: number, im: number) => Math.hypot(1 + re, im);
const halfOf = (re: number, im: number) => {
	const m = Math.hypot(1 + re, im);
	return m === 0 ? Infinity : Math.hypot(1 - re, im) / (2 * m);
};

const REFINED = 2;

/** L on the grid, when the caller has it already. */
export interface GridValues {
	re: Float64Array;
	im: Float64Array;
}

export function sensitivity(ev: PointEval, grid: number[], ends: EndPoint[], values?: GridValues): Sensitivity {
	const n = grid.length;
	const mod = new Float64Array(n);
	const half = new Float64Array(n);
	for (let i = 0; i < n; i++) {
		if (!values) ev.at(grid[i]);
		const re = values ? values.re[i] : ev.re;
		const im = values ? values.im[i] : ev.im;
		mod[i] = modulusOf(re, im);
		half[i] = halfOf(re, im);
		if (Number.isNaN(mod[i])) mod[i] = Infinity;
		if (Number.isNaN(half[i])) half[i] = 0.5;
	}
	const out: Sensitivity = { modulus: Infinity, modulusF: NaN, half: -Infinity, halfF: NaN };
	for (const e of ends) {
		const m = modulusOf(e.re, e.im);
		const h = halfOf(e.re, e.im);
		if (m < out.modulus) [out.modulus, out.modulusF] = [m, e.f];
		if (h > out.half) [out.half, out.halfF] = [h, e.f];
	}
	const refine = (values: Float64Array, sign: number, of: (re: number, im: number) => number): [number, number] => {
		let best = Infinity;
		let bestF = NaN;
		const found = extrema(values, sign);
		for (const i of found) {
			// a second extremum far from the first on the grid cannot win after refinement
			if (i !== found[0] && Math.abs(values[i] - values[found[0]]) > 0.1 * Math.abs(values[found[0]])) continue;
			if (sign * values[i] < best) [best, bestF] = [sign * values[i], grid[i]];
			const a = Math.log(grid[Math.max(0, i - 1)]);
			const b = Math.log(grid[Math.min(n - 1, i + 1)]);
			if (!(b > a)) continue;
			const [u, v] = brentMin((x) => {
				ev.at(Math.exp(x));
				const y = sign * of(ev.re, ev.im);
				return Number.isNaN(y) ? Infinity : y;
			}, a, b, 1e-8);
			if (v < best) [best, bestF] = [v, Math.exp(u)];
		}
		return [sign * best, bestF];
	};
	const [m, mf] = refine(mod, 1, modulusOf);
	if (m < out.modulus) [out.modulus, out.modulusF] = [m, mf];
	const [h, hf] = refine(half, -1, halfOf);
	if (h > out.half) [out.half, out.halfF] = [h, hf];
	return out;
}

/** Indices of the REFINED smallest local minima of sign·values (band ends included). */
function extrema(values: Float64Array, sign: number): number[] {
	const n = values.length;
	const idx: number[] = [];
	for (let i = 0; i < n; i++) {
		const v = sign * values[i];
		const left = i === 0 ? Infinity : sign * values[i - 1];
		const right = i === n - 1 ? Infinity : sign * values[i + 1];
		if (v <= left && v <= right && Number.isFinite(v)) idx.push(i);
	}
	idx.sort((a, b) => sign * values[a] - sign * values[b]);
	return idx.slice(0, REFINED);
}
