/**
 * L(e^{jθ}) of a sampled rational loop from its roots: L = lead · Π(z − zᵢ)/Π(z − pᵢ).
 * Products over factors stay accurate where Horner on z-coefficients cancels: near z = 1, where a
 * fast-sampled loop has its poles clustered, and at any θ for high orders. Each factor is
 * (e^{jθ} − 1) + (1 − r) with e^{jθ} − 1 = −2sin²(θ/2) + j·sin θ and 1 − r exact for r near 1.
 */
import type { Roots } from './roots';

/**
 * a + b·x for each x, as a plain array: above 8 roots a Float64Array costs an off-heap allocation
 * (buffers.ts), and all four lists of the hot loop below share one element kind.
 */
function affine(x: Float64Array, a: number, b: number): number[] {
	const out = new Array<number>(x.length);
	for (let i = 0; i < x.length; i++) out[i] = a + b * x[i];
	return out;
}

function copy(x: Float64Array): number[] {
	const out = new Array<number>(x.length);
	for (let i = 0; i < x.length; i++) out[i] = x[i];
	return out;
}

/** Roots exactly at z = 1. */
function exactOnes(r: Roots): number {
	let n = 0;
	for (let k = 0; k < r.re.length; k++) if (r.re[k] === 1 && r.im[k] === 0) n++;
	return n;
}

/** min |(e^{jθ} − 1) + (1 − r)|² over the roots r, from their stored offsets. */
function nearest(er: number, ei: number, offRe: number[], negIm: number[]): number {
	let best = Infinity;
	for (let i = 0; i < offRe.length; i++) {
		const fr = er + offRe[i];
		const fi = ei + negIm[i];
		best = Math.min(best, fr * fr + fi * fi);
	}
	return best;
}

export class SampledEval {
	readonly sampled = true;
	readonly lead: number;
	private readonly zr: number[];
	private readonly zi: number[];
	private readonly pr: number[];
	private readonly pi: number[];
	re = 0;
	im = 0;
	/** d ln L / dθ: real part is the log-magnitude slope, imaginary part the phase slope. */
	dre = 0;
	dim = 0;
	/** Distance from e^{jθ} to the nearest pole at the last point (0 on a pole). */
	denRelative = 1;
	/** The same for the zeros. */
	numRelative = 1;

	/** Roots at z = 1 exactly or up to rounding (see zRoots): they decide L(1). */
	private readonly onePoles: number;
	private readonly oneZeros: number;

	constructor(zeros: Roots, poles: Roots, lead: number) {
		this.lead = lead;
		this.onePoles = Math.max(exactOnes(poles), poles.atOne ?? 0);
		this.oneZeros = Math.max(exactOnes(zeros), zeros.atOne ?? 0);
		// stored as 1 − r so the factor needs no subtraction of nearly equal numbers
		this.zr = zeros.offRe ? copy(zeros.offRe) : affine(zeros.re, 1, -1);
		this.zi = affine(zeros.im, 0, -1);
		this.pr = poles.offRe ? copy(poles.offRe) : affine(poles.re, 1, -1);
		this.pi = affine(poles.im, 0, -1);
	}

	private run(theta: number, slope: boolean): void {
		const s = Math.sin(0.5 * theta);
		const er = -2 * s * s;
		// sin(π) is 1.2e-16 in floating point: at the Nyquist frequency z = −1 exactly
		const ei = theta === Math.PI ? 0 : Math.sin(theta);
		let lr = this.lead;
		let li = 0;
		let sr = 0;
		let si = 0;
		const nz = this.zr.length;
		const np = this.pr.length;
		const n = Math.max(nz, np);
		// zeros and poles interleaved so the running product neither overflows nor underflows
		for (let i = 0; i < n; i++) {
			if (i < nz) {
				const fr = er + this.zr[i];
				const fi = ei + this.zi[i];
				const t = lr * fr - li * fi;
				li = lr * fi + li * fr;
				lr = t;
				if (slope) {
					const d = fr * fr + fi * fi;
					sr += fr / d;
					si -= fi / d;
				}
			}
			if (i < np) {
				const fr = er + this.pr[i];
				const fi = ei + this.pi[i];
				const d = fr * fr + fi * fi;
				// one division per pole, not two (four with the slope): divisions are the loop's cost
				const inv = 1 / d;
				const t = (lr * fr + li * fi) * inv;
				li = (li * fr - lr * fi) * inv;
				lr = t;
				if (slope) {
					sr -= fr * inv;
					si += fi * inv;
				}
			}
		}
		this.re = lr;
		this.im = li;
		if (slope) {
			// d/dθ ln(e^{jθ} − r) = j e^{jθ} / (e^{jθ} − r)
			const cr = -ei;
			const ci = 1 + er;
			this.dre = sr * cr - si * ci;
			this.dim = sr * ci + si * cr;
		}
	}

	/** L, and the distances to the nearest pole and zero (denRelative, numRelative). */
	at(theta: number): void {
		this.run(theta, false);
		this.distances(theta);
	}

	/**
	 * L alone (re and im, the same bits as at()): what the grid and the sensitivity search need.
	 * The distances to the roots, which only the crossover checks read, cost a quarter of at().
	 */
	value(theta: number): void {
		this.run(theta, false);
	}

	private distances(theta: number): void {
		const s = Math.sin(0.5 * theta);
		const er = -2 * s * s;
		const ei = theta === Math.PI ? 0 : Math.sin(theta);
		this.denRelative = Math.sqrt(nearest(er, ei, this.pr, this.pi));
		this.numRelative = Math.sqrt(nearest(er, ei, this.zr, this.zi));
	}

	withSlope(theta: number): void {
		this.run(theta, true);
	}

	/** L at z = 1; Infinity on an open-loop pole there. */
	atZero(): number {
		if (this.onePoles > this.oneZeros) return Infinity;
		if (this.oneZeros > this.onePoles) return 0;
		if (this.onePoles > 0) return NaN;
		this.run(0, false);
		return this.re;
	}
}
