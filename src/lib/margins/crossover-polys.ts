/**
 * The real polynomials whose roots are the crossovers of a rational loop L = g·N/D.
 *
 * Continuous, with w = ω²:  N(jω) = A_N(w) + jω·B_N(w), so
 *   |L| = 1   ⇔  g²(A_N² + w B_N²) − (A_D² + w B_D²) = 0
 *   L real    ⇔  Im(N·conj D)/ω = B_N A_D − A_N B_D = 0.
 * Sampled, on z = e^{jθ}: |N|² is a cosine series and Im(N·conj D) a sine series (Chebyshev
 * series in cos θ, for the colleague matrix of high-order loops; low orders use the exactly
 * shifted polynomials of shifted.ts instead).
 */
import { trim, type Poly } from './polynomial';

/** [A, B] with p(jω) = A(ω²) + jω·B(ω²). */
export function evenOdd(p: Poly): [Poly, Poly] {
	const a: Poly = [];
	const b: Poly = [];
	for (let i = 0; i < p.length; i++) {
		const sign = Math.floor(i / 2) % 2 === 0 ? 1 : -1;
		if (i % 2 === 0) a.push(sign * p[i]);
		else b.push(sign * p[i]);
	}
	return [a, b];
}

/**
 * Σ a_i·b_(m−i) over i ascending: coefficient m of a·b, summed in the order mul() sums it (so the
 * fused forms below give the same bits as the products written out, without their arrays).
 */
function productAt(a: Poly, b: Poly, m: number): number {
	let s = 0;
	const first = Math.max(0, m - b.length + 1);
	const last = Math.min(m, a.length - 1);
	for (let i = first; i <= last; i++) s += a[i] * b[m - i];
	return s;
}

/** g²(A_N² + w·B_N²) − (A_D² + w·B_D²), coefficient by coefficient. */
export function continuousGainPoly(num: Poly, den: Poly, g: number): Poly {
	const [an, bn] = evenOdd(num);
	const [ad, bd] = evenOdd(den);
	const size = Math.max(num.length, den.length);
	const out = new Array<number>(size).fill(0);
	const g2 = g * g;
	for (let m = 0; m < size; m++) {
		const n2 = productAt(an, an, m) + (m > 0 ? productAt(bn, bn, m - 1) : 0);
		const d2 = productAt(ad, ad, m) + (m > 0 ? productAt(bd, bd, m - 1) : 0);
		out[m] = g2 * n2 - d2;
	}
	return trim(out);
}

export function continuousPhasePoly(num: Poly, den: Poly): Poly {
	const [an, bn] = evenOdd(num);
	const [ad, bd] = evenOdd(den);
	const size = Math.max(num.length, den.length);
	const out = new Array<number>(size).fill(0);
	for (let m = 0; m < size; m++) out[m] = productAt(bn, ad, m) - productAt(an, bd, m);
	return trim(out);
}

/** r_m = Σ p_i p_(i+m): |p(e^{jθ})|² = r_0 + 2 Σ r_m cos mθ. */
function autocorrelation(p: Poly): number[] {
	const r = new Array<number>(p.length).fill(0);
	for (let m = 0; m < p.length; m++) for (let i = 0; i + m < p.length; i++) r[m] += p[i] * p[i + m];
	return r;
}

/** Cosine-series coefficients (of cos mθ) of g²|N|² − |D|². */
export function sampledGainSeries(num: Poly, den: Poly, g: number): number[] {
	const rn = autocorrelation(num);
	const rd = autocorrelation(den);
	const out = new Array<number>(Math.max(rn.length, rd.length)).fill(0);
	for (let m = 0; m < out.length; m++)
		out[m] = (m === 0 ? 1 : 2) * (g * g * (rn[m] ?? 0) - (rd[m] ?? 0));
	return out;
}

/** Sine-series coefficients (of sin mθ, index m ≥ 1) of Im(N(e^{jθ})·conj D(e^{jθ})). */
export function sampledPhaseSeries(num: Poly, den: Poly): number[] {
	const size = Math.max(num.length, den.length);
	const out = new Array<number>(size).fill(0);
	for (let i = 0; i < num.length; i++)
		for (let l = 0; l < den.length; l++) {
			const m = i - l;
			if (m > 0) out[m] += num[i] * den[l];
			else if (m < 0) out[-m] -= num[i] * den[l];
		}
	return out;
}
