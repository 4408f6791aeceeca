/**
 * Zeros of a sampled state-space factor, N(z) = D(z)·(c(zI − Φ)⁻¹Γ + d): first from the
 * coefficients of N fitted on the unit circle (good everywhere to the coefficients' rounding),
 * then each polished by Newton on N itself, evaluated by linear solves in w = z − 1 with
 * M = Φ − I, where zeros crowding at z = 1 (a fast-sampled block) are resolved to full relative
 * precision instead of to the rounding of z-coefficients.
 */
import { aberthStep } from './aberth';
import { fitOnCircle } from './circle-fit';
import type { Matrix } from './linalg';
import type { Roots } from './roots';
import { wRoots } from './roots';
import { shiftTo } from './shifted';
import type { Poly } from './polynomial';

export interface SampledSystem {
	/** Φ − I (or A − I for a z-domain block). */
	m: Matrix;
	g: number[];
	c: number[];
	d: number;
	/** The poles, with precise offsets 1 − p. */
	poles: Roots;
}

/** N in powers of w = z − 1, and its zeros (polished), from the system. */
export function sampledNumerator(sys: SampledSystem): { numW: Poly; zeros: Roots } {
	const n = sys.m.length;
	const h = (xr: number, xi: number) => value(sys, xr - 1, xi)[0];
	// coefficients in z from the unit circle (the block's whole response at rounding level); without
	// a feedthrough d, N has degree n − 1 and a fitted z^n term would only be noise
	const numZ = fitOnCircle(sys.d === 0 ? n : n + 1, 0, 1, sys.poles, h);
	const degree = numZ.length - 1;
	// the leading coefficient exactly: d, or the first Markov parameter c·Φ^k·Γ that the degree names
	const lead = sys.d !== 0 ? sys.d : markov(sys, n - 1 - degree);
	const far = wRoots(shiftTo(numZ, 1), true);
	// zeros crowding at z = 1 come out of a fit on a circle of their own size
	let radius = 0;
	for (let i = 0; i < sys.poles.re.length; i++)
		radius = Math.max(
			radius,
			Math.hypot(-(sys.poles.offRe?.[i] ?? 1 - sys.poles.re[i]), sys.poles.im[i])
		);
	radius = Math.min(0.5, Math.max(1e-12, 4 * radius));
	const nearW = fitOnCircle(degree + 1, 1, radius, sys.poles, h);
	const near = nearW.length - 1 === degree ? wRoots(nearW, false) : far;
	const start = merge(far, near, 2 * radius, degree);
	const { re, im } = refineOnN(sys, start);
	const off = Float64Array.from(re, (x, i) => (start.offRe && start.offRe[i] === 2 ? 2 : -x));
	const zeros: Roots = {
		re: Float64Array.from(re, (x, i) => (off[i] === 2 ? -1 : 1 + x)),
		im,
		offRe: off,
		atOne: far.atOne
	};
	let numW: Poly = [lead];
	for (let i = 0; i < re.length; i++) {
		const a = -off[i];
		if (im[i] === 0) numW = multiply(numW, [-a, 1]);
		else if (im[i] > 0) numW = multiply(numW, [a * a + im[i] * im[i], -2 * a, 1]);
	}
	return { numW, zeros };
}

/** Zeros within `within` of z = 1 from the near fit, the rest from the far one (when the counts agree). */
function merge(far: Roots, near: Roots, within: number, degree: number): Roots {
	const pick = (r: Roots, inside: boolean) => {
		const idx: number[] = [];
		for (let i = 0; i < r.re.length; i++) {
			const w = Math.hypot(r.offRe ? r.offRe[i] : 1 - r.re[i], r.im[i]);
			if (w <= within === inside) idx.push(i);
		}
		return idx;
	};
	const a = pick(near, true);
	const b = pick(far, false);
	if (a.length + b.length !== degree) return far;
	const take = (r: Roots, idx: number[]) =>
		idx.map((i) => [r.re[i], r.im[i], r.offRe ? r.offRe[i] : 1 - r.re[i]]);
	const all = [...take(near, a), ...take(far, b)];
	return {
		re: Float64Array.from(all, (x) => x[0]),
		im: Float64Array.from(all, (x) => x[1]),
		offRe: Float64Array.from(all, (x) => x[2])
	};
}

/**
 * Aberth's simultaneous iteration on N(w) itself (evaluated by linear solves), in w = z − 1,
 * from the fitted zeros; exact zeros at z = −1 stay put. Returns w-coordinates (re, im).
 */
function refineOnN(sys: SampledSystem, start: Roots): { re: Float64Array; im: Float64Array } {
	const m = start.re.length;
	const re = Float64Array.from(
		start.re,
		(_, i) => -(start.offRe ? start.offRe[i] : 1 - start.re[i])
	);
	const im = start.im.slice();
	const fixed = Uint8Array.from(start.re, (_, i) => (start.offRe && start.offRe[i] === 2 ? 1 : 0));
	liftClosePairs(re, im, fixed);
	for (let iter = 0; iter < 60; iter++) {
		let moved = 0;
		for (let k = 0; k < m; k++) {
			if (fixed[k]) continue;
			const step = newtonStep(sys, re[k], im[k]);
			if (!step) continue;
			const moves = aberthStep(re, im, m, k, step[0], step[1]);
			if (moves > 1e-14 * Math.hypot(re[k], im[k])) moved++;
		}
		if (moved === 0) break;
	}
	// a real block's zeros are real or in conjugate pairs: make them exactly so
	for (let k = 0; k < m; k++) if (Math.abs(im[k]) <= 1e-12 * Math.hypot(re[k], im[k])) im[k] = 0;
	for (let k = 0; k < m; k++) {
		if (im[k] <= 0) continue;
		let best = -1;
		for (let j = 0; j < m; j++)
			if (
				im[j] < 0 &&
				(best < 0 ||
					Math.hypot(re[j] - re[k], im[j] + im[k]) < Math.hypot(re[best] - re[k], im[best] + im[k]))
			)
				best = j;
		if (best < 0) continue;
		const a = 0.5 * (re[k] + re[best]);
		const b = 0.5 * (im[k] - im[best]);
		[re[k], im[k], re[best], im[best]] = [a, b, a, -b];
	}
	return { re, im };
}

/** Real starts closer than this (relative) are a near-double zero: its pair may be complex. */
const CLOSE_PAIR = 1e-2;

/**
 * Newton steps of a real function from real starts stay real: a close complex pair of zeros that
 * the fit's rounding split into two real ones is never reached from there, and the two starts
 * wander along the axis for good (seed 702362, ZOH of an order-8 block: 0.047541 ± 2.2e-4j fitted
 * as 0.04717 and 0.04791, left at 0.04758 and 0.04786 after 60 steps: 4e-4 of |L| lost at every
 * frequency). Each such pair is lifted off the
 * axis, both above it and at unequal heights so no symmetry holds them there; a pair that is
 * truly real comes back to the axis, where the snap after the iteration puts it exactly.
 */
function liftClosePairs(re: Float64Array, im: Float64Array, fixed: Uint8Array): void {
	const m = re.length;
	const lifted = new Uint8Array(m);
	for (let k = 0; k < m; k++) {
		if (fixed[k] || lifted[k] || im[k] !== 0) continue;
		for (let j = k + 1; j < m; j++) {
			if (fixed[j] || lifted[j] || im[j] !== 0) continue;
			const size = Math.max(Math.abs(re[k]), Math.abs(re[j]));
			const gap = Math.abs(re[k] - re[j]);
			if (gap > CLOSE_PAIR * size) continue;
			// a start exactly double (gap 0) is lifted too
			const h = Math.max(gap, 1e-8 * size);
			im[k] = 0.5 * h;
			im[j] = 0.25 * h;
			lifted[k] = lifted[j] = 1;
			break;
		}
	}
}

/** c·Φ^k·g with Φ = M + I. */
function markov(sys: SampledSystem, k: number): number {
	let v = sys.g.slice();
	for (let step = 0; step < k; step++)
		v = sys.m.map((row, i) => row.reduce((s, x, j) => s + x * v[j], v[i]));
	return sys.c.reduce((s, x, i) => s + x * v[i], 0);
}

function multiply(a: Poly, b: Poly): Poly {
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
	return out;
}

/**
 * H(w) = c(wI − M)⁻¹g + d and H'(w) = −c(wI − M)⁻²g (complex w) by one LU factorisation;
 * returns [H, H', D(w)/1 factor-free] as [hr, hi, dr, di].
 */
function value(sys: SampledSystem, wr: number, wi: number): [[number, number], [number, number]] {
	const n = sys.m.length;
	const ar = sys.m.map((row, i) => row.map((x, j) => (i === j ? wr : 0) - x));
	const ai = sys.m.map((row, i) => row.map((_, j) => (i === j ? wi : 0)));
	const perm = Array.from({ length: n }, (_, i) => i);
	for (let col = 0; col < n; col++) {
		let piv = col;
		for (let r = col + 1; r < n; r++)
			if (Math.hypot(ar[r][col], ai[r][col]) > Math.hypot(ar[piv][col], ai[piv][col])) piv = r;
		[ar[col], ar[piv]] = [ar[piv], ar[col]];
		[ai[col], ai[piv]] = [ai[piv], ai[col]];
		[perm[col], perm[piv]] = [perm[piv], perm[col]];
		const pd = ar[col][col] ** 2 + ai[col][col] ** 2;
		if (pd === 0) continue;
		for (let r = col + 1; r < n; r++) {
			const fr = (ar[r][col] * ar[col][col] + ai[r][col] * ai[col][col]) / pd;
			const fi = (ai[r][col] * ar[col][col] - ar[r][col] * ai[col][col]) / pd;
			ar[r][col] = fr;
			ai[r][col] = fi;
			for (let j = col + 1; j < n; j++) {
				ar[r][j] -= fr * ar[col][j] - fi * ai[col][j];
				ai[r][j] -= fr * ai[col][j] + fi * ar[col][j];
			}
		}
	}
	const solve = (br: number[], bi: number[]): [number[], number[]] => {
		const yr = perm.map((p) => br[p]);
		const yi = perm.map((p) => bi[p]);
		for (let r = 0; r < n; r++)
			for (let j = 0; j < r; j++) {
				yr[r] -= ar[r][j] * yr[j] - ai[r][j] * yi[j];
				yi[r] -= ar[r][j] * yi[j] + ai[r][j] * yr[j];
			}
		for (let r = n - 1; r >= 0; r--) {
			for (let j = r + 1; j < n; j++) {
				yr[r] -= ar[r][j] * yr[j] - ai[r][j] * yi[j];
				yi[r] -= ar[r][j] * yi[j] + ai[r][j] * yr[j];
			}
			const pd = ar[r][r] ** 2 + ai[r][r] ** 2;
			[yr[r], yi[r]] = [
				(yr[r] * ar[r][r] + yi[r] * ai[r][r]) / pd,
				(yi[r] * ar[r][r] - yr[r] * ai[r][r]) / pd
			];
		}
		return [yr, yi];
	};
	const [x1r, x1i] = solve(
		sys.g,
		sys.g.map(() => 0)
	);
	const [x2r, x2i] = solve(x1r, x1i);
	let hr = sys.d;
	let hi = 0;
	let dr = 0;
	let di = 0;
	for (let i = 0; i < n; i++) {
		hr += sys.c[i] * x1r[i];
		hi += sys.c[i] * x1i[i];
		dr -= sys.c[i] * x2r[i];
		di -= sys.c[i] * x2i[i];
	}
	return [
		[hr, hi],
		[dr, di]
	];
}

/** Newton step N/N' for N = D·H: N'/N = Σ 1/(w − qᵢ) + H'/H. */
function newtonStep(sys: SampledSystem, wr: number, wi: number): [number, number] | null {
	const [[hr, hi], [dr, di]] = value(sys, wr, wi);
	const hh = hr * hr + hi * hi;
	if (hh === 0) return [0, 0];
	// H'/H
	let sr = (dr * hr + di * hi) / hh;
	let si = (di * hr - dr * hi) / hh;
	const p = sys.poles;
	for (let i = 0; i < p.re.length; i++) {
		const qr = wr + (p.offRe ? p.offRe[i] : 1 - p.re[i]);
		const qi = wi - p.im[i];
		const q = qr * qr + qi * qi;
		if (q === 0) return null;
		sr += qr / q;
		si -= qi / q;
	}
	const ss = sr * sr + si * si;
	if (ss === 0) return null;
	return [sr / ss, -si / ss];
}
