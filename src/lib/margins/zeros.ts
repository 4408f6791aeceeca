/**
 * Zeros of a sampled state-space factor, N(z) = D(z)·(c(zI − Φ)⁻¹Γ + d): first from the
 * coefficients of N fitted on the unit circle (good everywhere to the coefficients' rounding),
 * then each polished by Newton on N itself, evaluated by linear solves in w = z − 1 with
 * M = Φ − I, where zeros crowding at z = 1 (a fast-sampled block) are resolved to full relative
 * precision instead of to the rounding of z-coefficients.
 */
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
	const z = (wr: number, wi: number) => value(sys, wr, wi)[0];
	// coefficients in z from the unit circle (the block's whole response at rounding level); without
	// a feedthrough d, N has degree n − 1 and a fitted z^n term would only be noise
	const numZ = fitOnCircle(sys.d === 0 ? n : n + 1, 0, 1, sys.poles, (xr, xi) => {
		const [hr, hi] = z(xr - 1, xi);
		return [hr, hi];
	});
	const numW0 = shiftTo(numZ, 1);
	const start = wRoots(numW0, true);
	const re = start.re.slice();
	const im = start.im.slice();
	const off = start.offRe ? start.offRe.slice() : Float64Array.from(re, (x) => 1 - x);
	for (let i = 0; i < re.length; i++) {
		if (im[i] < 0 || off[i] === 2) continue; // conjugates follow their partner; exact −1 stays
		let wr = -off[i];
		let wi = im[i];
		for (let it = 0; it < 8; it++) {
			const step = newtonStep(sys, wr, wi);
			if (!step) break;
			const [sr, si] = step;
			if (!Number.isFinite(sr) || Math.hypot(sr, si) > 0.5 * (Math.hypot(wr, wi) + 1e-300) + 1e-3) break;
			wr -= sr;
			wi = im[i] === 0 ? 0 : wi - si;
			if (Math.hypot(sr, si) <= 1e-15 * Math.hypot(wr, wi)) break;
		}
		off[i] = -wr;
		re[i] = 1 + wr;
		im[i] = wi;
		if (wi !== 0) {
			const j = findPartner(start, i);
			if (j >= 0) {
				off[j] = -wr;
				re[j] = 1 + wr;
				im[j] = -wi;
			}
		}
	}
	const zeros: Roots = { re, im, offRe: off, atOne: start.atOne };
	// the leading coefficient exactly: d, or the first Markov parameter c·Φ^k·Γ that the degree names
	const lead = sys.d !== 0 ? sys.d : markov(sys, n - 1 - (numW0.length - 1));
	let numW: Poly = [lead];
	for (let i = 0; i < re.length; i++) {
		const a = -off[i];
		if (im[i] === 0) numW = multiply(numW, [-a, 1]);
		else if (im[i] > 0) numW = multiply(numW, [a * a + im[i] * im[i], -2 * a, 1]);
	}
	return { numW, zeros };
}

/** c·Φ^k·g with Φ = M + I. */
function markov(sys: SampledSystem, k: number): number {
	let v = sys.g.slice();
	for (let step = 0; step < k; step++) v = sys.m.map((row, i) => row.reduce((s, x, j) => s + x * v[j], v[i]));
	return sys.c.reduce((s, x, i) => s + x * v[i], 0);
}

function findPartner(r: Roots, i: number): number {
	let best = -1;
	for (let j = 0; j < r.re.length; j++)
		if (j !== i && r.im[j] < 0 && (best < 0 || Math.hypot(r.re[j] - r.re[i], r.im[j] + r.im[i]) < Math.hypot(r.re[best] - r.re[i], r.im[best] + r.im[i])))
			best = j;
	return best;
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
		for (let r = col + 1; r < n; r++) if (Math.hypot(ar[r][col], ai[r][col]) > Math.hypot(ar[piv][col], ai[piv][col])) piv = r;
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
			[yr[r], yi[r]] = [(yr[r] * ar[r][r] + yi[r] * ai[r][r]) / pd, (yi[r] * ar[r][r] - yr[r] * ai[r][r]) / pd];
		}
		return [yr, yi];
	};
	const [x1r, x1i] = solve(sys.g, sys.g.map(() => 0));
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
