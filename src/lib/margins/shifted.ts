/**
 * Sampled loops near z = 1 (and z = −1). A loop sampled far faster than its dynamics has its
 * poles and zeros clustered at z = 1, where the z-coefficients hold the response only in their
 * last digits. Shifting the variable, w = z − c (c = ±1), in double-double arithmetic makes each
 * shifted coefficient exact to rounding; crossover polynomials and stability tests built from
 * them keep full relative precision as θ → 0 (c = 1) or θ → π (c = −1).
 *
 * On the unit circle the crossover conditions become polynomials in u = |z − c|² (= 2 − 2c·cos θ,
 * so u = 2y with y = 1 − cos θ for c = 1), because w + w̄ = −c·u and w·w̄ = u:
 *   |P|² = Σ aᵢ² uⁱ + Σ_{i<k} aᵢ a_k uⁱ p_{k−i}(u),       p_m = w^m + w̄^m,
 *   Im(N·conj D) = sin θ · Σ_{i≠k} ± nᵢ d_k u^{min(i,k)} q_{|i−k|}(u),   q_m = (w^m − w̄^m)/(w − w̄).
 */
import { trim, type Poly } from './polynomial';
import { filled } from './buffers';

/**
 * Coefficients of p(c + w) in powers of w (ascending), exact to rounding: repeated synthetic
 * division by (x − c) with the sums carried in double-double. c must be a power of two (or ±1)
 * so that c·x is exact.
 */
export function shiftTo(p: Poly, c: number): Poly {
	const n = p.length;
	const hi = p.slice();
	const lo = filled(n);
	for (let k = 0; k < n - 1; k++)
		for (let i = n - 2; i >= k; i--) {
			// twoSum(hi[i], c·hi[i + 1]) written out: no pair allocated in the O(n²) loop
			const a = hi[i];
			const b = c * hi[i + 1];
			const s = a + b;
			const v = s - a;
			hi[i] = s;
			lo[i] += a - (s - v) + (b - v) + c * lo[i + 1];
		}
	for (let i = 0; i < n; i++) hi[i] += lo[i];
	return hi;
}

const polyMul = (a: Poly, b: Poly): Poly => {
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
	return out;
};

function accumulate(out: number[], poly: Poly, factor: number, shift: number): void {
	for (let i = 0; i < poly.length; i++) out[i + shift] += factor * poly[i];
}

const sumsCache = new Map<number, { p: Poly[]; q: Poly[] }>();

/** p_m and q_m as polynomials in u, for m = 0..M (shared, read-only: they depend on M and c alone). */
function symmetricSums(M: number, c: 1 | -1): { p: Poly[]; q: Poly[] } {
	const key = c * (M + 1);
	let sums = sumsCache.get(key);
	if (!sums) sumsCache.set(key, (sums = buildSums(M, c)));
	return sums;
}

function buildSums(M: number, c: 1 | -1): { p: Poly[]; q: Poly[] } {
	// x_m = e1·x_(m−1) − e2·x_(m−2) with e1 = −c·u, e2 = u
	const step = (a: Poly, b: Poly): Poly => {
		const out = new Array<number>(Math.max(a.length, b.length) + 1).fill(0);
		for (let i = 0; i < a.length; i++) out[i + 1] += -c * a[i];
		for (let i = 0; i < b.length; i++) out[i + 1] -= b[i];
		return out;
	};
	const p: Poly[] = [[2], [0, -c]];
	const q: Poly[] = [[0], [1]];
	for (let m = 2; m <= M; m++) {
		p.push(step(p[m - 1], p[m - 2]));
		q.push(step(q[m - 1], q[m - 2]));
	}
	return { p, q };
}

/** |P|² on the unit circle as a polynomial in u, from P's coefficients shifted to c. */
function squaredMagnitude(a: Poly, sums: { p: Poly[] }, size: number): number[] {
	const out = new Array<number>(size).fill(0);
	for (let i = 0; i < a.length; i++) {
		if (a[i] === 0) continue;
		out[i] += a[i] * a[i];
		for (let k = i + 1; k < a.length; k++)
			if (a[k] !== 0) accumulate(out, sums.p[k - i], a[i] * a[k], i);
	}
	return out;
}

/** g²|N|² − |D|² as a polynomial in u = |z − c|²; n, d already shifted to c. */
export function gainPolyU(n: Poly, d: Poly, g: number, c: 1 | -1): Poly {
	const M = Math.max(n.length, d.length);
	const sums = symmetricSums(M, c);
	// uⁱ·p_(k−i) has degree k < M: M coefficients hold |P|² exactly, with no zeros to trim off
	const N2 = squaredMagnitude(n, sums, M);
	const D2 = squaredMagnitude(d, sums, M);
	for (let i = 0; i < M; i++) N2[i] = g * g * N2[i] - D2[i];
	return trim(N2);
}

/** Im(N·conj D)/sin θ as a polynomial in u = |z − c|²; n, d already shifted to c. */
export function phasePolyU(n: Poly, d: Poly, c: 1 | -1): Poly {
	const M = Math.max(n.length, d.length);
	const sums = symmetricSums(M, c);
	// u^min(i,k)·q_|i−k| has degree max(i, k) − 1 < M − 1
	const out = new Array<number>(Math.max(M - 1, 0)).fill(0);
	for (let i = 0; i < n.length; i++)
		for (let k = 0; k < d.length; k++) {
			if (i === k || n[i] === 0 || d[k] === 0) continue;
			if (i > k) accumulate(out, sums.q[i - k], n[i] * d[k], k);
			else accumulate(out, sums.q[k - i], -n[i] * d[k], i);
		}
	return trim(out);
}

/** θ from u = |e^{jθ} − c|² = 4 sin²(θ/2) (c = 1) or 4 cos²(θ/2) (c = −1). */
export function thetaFromU(u: number, c: 1 | -1): number {
	const half = 2 * Math.asin(Math.min(1, Math.sqrt(Math.max(0, u)) / 2));
	return c === 1 ? half : Math.PI - half;
}

/**
 * (1 − s)^n · A(w(s)) for the bilinear map z = (1 + s)/(1 − s), from A's coefficients shifted
 * to z = 1 (w = 2s/(1 − s)): roots near z = 1 map near s = 0 with their precision intact.
 */
export function bilinearFromShifted(a: Poly): Poly {
	const n = a.length - 1;
	const out = new Array<number>(n + 1).fill(0);
	const powers: Poly[] = [[1]];
	for (let i = 1; i <= n; i++) powers.push(polyMul(powers[i - 1], [1, -1]));
	for (let i = 0; i <= n; i++) {
		if (a[i] === 0) continue;
		// a_i (2s)^i (1 − s)^(n−i)
		const f = a[i] * 2 ** i;
		const oneMinus = powers[n - i];
		for (let j = 0; j < oneMinus.length; j++) out[i + j] += f * oneMinus[j];
	}
	return trim(out);
}
