/**
 * Real polynomials as coefficient arrays in ASCENDING powers (p[i] multiplies x^i). The file
 * format is descending; it is reversed once at the edge so the algebra here reads like the maths.
 */

export type Poly = number[];

/** Descending (file order) to ascending. */
export function fromDescending(coefficients: readonly number[]): Poly {
	return trim(coefficients.slice().reverse());
}

/** Drops exactly-zero highest coefficients; the zero polynomial becomes []. */
export function trim(p: Poly): Poly {
	let n = p.length;
	while (n > 0 && p[n - 1] === 0) n--;
	return n === p.length ? p : p.slice(0, n);
}

export const degree = (p: Poly): number => trim(p).length - 1;

export function mul(a: Poly, b: Poly): Poly {
	if (a.length === 0 || b.length === 0) return [];
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) {
		const ai = a[i];
		if (ai === 0) continue;
		for (let j = 0; j < b.length; j++) out[i + j] += ai * b[j];
	}
	return out;
}

export function add(a: Poly, b: Poly): Poly {
	const out = new Array<number>(Math.max(a.length, b.length)).fill(0);
	for (let i = 0; i < a.length; i++) out[i] += a[i];
	for (let i = 0; i < b.length; i++) out[i] += b[i];
	return trim(out);
}

export const scale = (p: Poly, c: number): Poly => trim(p.map((x) => x * c));

export const sub = (a: Poly, b: Poly): Poly => add(a, scale(b, -1));

/** p(c·x): frequency scaling keeps coefficients of stiff loops within a sane range. */
export function scaleArgument(p: Poly, c: number): Poly {
	const out = new Array<number>(p.length);
	let f = 1;
	for (let i = 0; i < p.length; i++) {
		out[i] = p[i] * f;
		f *= c;
	}
	return out;
}

/** x^k·p(x). */
export function shiftUp(p: Poly, k: number): Poly {
	if (k === 0 || p.length === 0) return p;
	return new Array<number>(k).fill(0).concat(p);
}

export function derivative(p: Poly): Poly {
	const out: Poly = [];
	for (let i = 1; i < p.length; i++) out.push(i * p[i]);
	return out;
}

export function evalReal(p: Poly, x: number): number {
	let r = 0;
	for (let i = p.length - 1; i >= 0; i--) r = r * x + p[i];
	return r;
}

/** Number of exactly-zero lowest coefficients, i.e. roots at the origin. */
export function lowOrder(p: Poly): number {
	let k = 0;
	while (k < p.length && p[k] === 0) k++;
	return k;
}

/**
 * Real coefficients from roots given as parallel re/im arrays. Complex roots are expected in
 * conjugate pairs; each pair with im > 0 contributes one real quadratic, which keeps the result
 * exactly real instead of real up to rounding.
 */
export function fromRoots(re: ArrayLike<number>, im: ArrayLike<number>, lead = 1): Poly {
	let p: Poly = [lead];
	for (let i = 0; i < re.length; i++) {
		if (im[i] === 0) p = mul(p, [-re[i], 1]);
		else if (im[i] > 0) p = mul(p, [re[i] * re[i] + im[i] * im[i], -2 * re[i], 1]);
	}
	return p;
}

/** Power of two nearest to x > 0: scaling by it is exact. */
export function powerOfTwo(x: number): number {
	if (!(x > 0) || !Number.isFinite(x)) return 1;
	return 2 ** Math.round(Math.log2(x));
}

/**
 * Frequency at the geometric centre of the nonzero roots, from the coefficients alone:
 * |p_lo / p_hi|^(1/(hi−lo)) is the geometric mean of the nonzero root magnitudes.
 */
export function rootCentre(p: Poly): number | null {
	const q = trim(p);
	const lo = lowOrder(q);
	const hi = q.length - 1;
	if (hi - lo < 1) return null;
	return Math.pow(Math.abs(q[lo] / q[hi]), 1 / (hi - lo));
}

/** Fujiwara's bound on the root magnitudes of p (ascending). */
export function rootBound(p: Poly): number {
	const n = p.length - 1;
	let bound = 0;
	for (let k = 1; k <= n; k++) bound = Math.max(bound, Math.abs(p[n - k] / p[n]) ** (1 / k));
	return 2 * bound;
}

/** Σ|p_i|, summed in order. */
export function sumAbs(p: ArrayLike<number>): number {
	let s = 0;
	for (let i = 0; i < p.length; i++) s += Math.abs(p[i]);
	return s;
}

/** Largest |coefficient|, for scale-aware tolerances. */
export function maxAbs(p: Poly): number {
	let m = 0;
	// indexed, not for…of: the arrays here come in several element kinds, and for…of over a
	// polymorphic site costs several times as much
	for (let i = 0; i < p.length; i++) m = Math.max(m, Math.abs(p[i]));
	return m;
}

/** Divides by a power of two so the largest coefficient is near 1 (exact, avoids overflow). */
export function normalise(p: Poly): Poly {
	const m = maxAbs(p);
	if (m === 0) return p;
	const f = powerOfTwo(m);
	return f === 1 ? p : p.map((c) => c / f);
}
