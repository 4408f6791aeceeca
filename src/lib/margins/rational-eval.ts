/**
 * Fast evaluation of a continuous rational loop L = g·N/D at s = jω by Horner's rule in complex
 * arithmetic on plain numbers (no allocation per point), in the scaled variable x = s/ω₀ so stiff
 * loops stay in range. Sampled loops are evaluated from their roots instead (sampled-eval.ts).
 */
import { maxAbs, powerOfTwo, rootCentre, scaleArgument, trim, type Poly } from './polynomial';
import { hypot } from './hypot';

/** What the crossover search needs of an evaluator, continuous (f = ω) or sampled (f = θ). */
export interface LoopEval {
	readonly sampled: boolean;
	re: number;
	im: number;
	dre: number;
	dim: number;
	denRelative: number;
	/** The same for N: near 0 on an open-loop zero (where L = 0 is not "real and negative"). */
	numRelative: number;
	at(f: number): void;
	/** re and im alone, as at() sets them. */
	value(f: number): void;
	withSlope(f: number): void;
	atZero(): number;
}

export class ContinuousEval implements LoopEval {
	readonly sampled = false;
	/** Frequency scale: s = ω₀·x. */
	readonly w0: number;
	/** Plain arrays: above 8 coefficients a Float64Array costs an off-heap allocation (buffers.ts). */
	readonly num: Poly;
	readonly den: Poly;
	readonly gain: number;
	re = 0;
	im = 0;
	/** d ln L / d ln ω: real part → log-magnitude slope, imaginary → phase slope. */
	dre = 0;
	dim = 0;
	/** |D| relative to Σ|d_i||x|^i at the last point: near 0 on an open-loop pole. */
	denRelative = 1;
	numRelative = 1;

	constructor(num: Poly, den: Poly, gain: number) {
		const centres = [rootCentre(num), rootCentre(den)].filter(
			(c): c is number => c !== null && c > 0
		);
		this.w0 = centres.length
			? powerOfTwo(centres.reduce((p, c) => p * c, 1) ** (1 / centres.length))
			: 1;
		const n = scaleArgument(num, this.w0);
		const d = scaleArgument(den, this.w0);
		const sn = powerOfTwo(maxAbs(n));
		const sd = powerOfTwo(maxAbs(d));
		this.num = divided(trim(n), sn);
		this.den = divided(trim(d), sd);
		this.gain = (gain * sn) / sd;
	}

	/** Sets re, im to L at ω = f, and denRelative, numRelative. */
	at(f: number): void {
		this.value(f);
		// the scales Σ|p_i||x|^i of Horner's rounding, for the relative sizes of N and D
		const ax = Math.abs(f / this.w0);
		let scaleN = 0;
		for (let i = this.num.length - 1; i >= 0; i--) scaleN = scaleN * ax + Math.abs(this.num[i]);
		let scaleD = 0;
		for (let i = this.den.length - 1; i >= 0; i--) scaleD = scaleD * ax + Math.abs(this.den[i]);
		const { nr, ni, dr, di } = this;
		this.denRelative = scaleD > 0 ? Math.sqrt(dr * dr + di * di) / scaleD : 0;
		this.numRelative = scaleN > 0 ? hypot(nr, ni) / scaleN : 0;
	}

	/** N(jx) and D(jx) at the last value(), for at(). */
	private nr = 0;
	private ni = 0;
	private dr = 0;
	private di = 0;

	/** L alone (re and im, the same bits as at()): what the grid and the sensitivity search need. */
	value(f: number): void {
		const x = f / this.w0;
		const n = this.num;
		const d = this.den;
		// Horner at the imaginary point jx: (a + jb)·jx = −bx + jax
		let nr = 0;
		let ni = 0;
		for (let i = n.length - 1; i >= 0; i--) {
			const t = n[i] - ni * x;
			ni = nr * x;
			nr = t;
		}
		let dr = 0;
		let di = 0;
		for (let i = d.length - 1; i >= 0; i--) {
			const t = d[i] - di * x;
			di = dr * x;
			dr = t;
		}
		this.nr = nr;
		this.ni = ni;
		this.dr = dr;
		this.di = di;
		const dd = dr * dr + di * di;
		const g = this.gain / dd;
		this.re = g * (nr * dr + ni * di);
		this.im = g * (ni * dr - nr * di);
	}

	/** Like at(), and also the log-derivative (dre, dim). */
	withSlope(f: number): void {
		const xr = 0;
		const xi = f / this.w0;
		const [nr, ni, npr, npi] = hornerWithDerivative(this.num, xr, xi);
		const [dr, di, dpr, dpi] = hornerWithDerivative(this.den, xr, xi);
		const dd = dr * dr + di * di;
		const g = this.gain / dd;
		this.re = g * (nr * dr + ni * di);
		this.im = g * (ni * dr - nr * di);
		// N'/N − D'/D
		const nn = nr * nr + ni * ni;
		let qr = (npr * nr + npi * ni) / nn - (dpr * dr + dpi * di) / dd;
		let qi = (npi * nr - npr * ni) / nn - (dpi * dr - dpr * di) / dd;
		if (!Number.isFinite(qr) || !Number.isFinite(qi)) qr = qi = 0;
		// chain rule: dx/d ln ω = x
		this.dre = -qi * xi;
		this.dim = qr * xi;
	}

	/** L at ω = 0; Infinity on an open-loop pole there. */
	atZero(): number {
		const d0 = this.den[0];
		const n0 = this.num[0] ?? 0;
		if (d0 === 0) return n0 === 0 ? NaN : Infinity;
		return (this.gain * n0) / d0;
	}

	/** L as ω → ∞ (proper loops). */
	atInfinity(): number {
		if (this.num.length < this.den.length) return 0;
		return (this.gain * this.num[this.num.length - 1]) / this.den[this.den.length - 1];
	}
}

/** p / s. */
function divided(p: Poly, s: number): Poly {
	const out = new Array<number>(p.length);
	for (let i = 0; i < p.length; i++) out[i] = p[i] / s;
	return out;
}

/** p(x) and p'(x) at complex x = xr + i·xi by Horner, coefficients in ascending powers. */
export function hornerWithDerivative(
	p: ArrayLike<number>,
	xr: number,
	xi: number
): [number, number, number, number] {
	let pr = 0;
	let pi = 0;
	let dr = 0;
	let di = 0;
	for (let i = p.length - 1; i >= 0; i--) {
		const tr = dr * xr - di * xi + pr;
		di = dr * xi + di * xr + pi;
		dr = tr;
		const t = pr * xr - pi * xi + p[i];
		pi = pr * xi + pi * xr;
		pr = t;
	}
	return [pr, pi, dr, di];
}
