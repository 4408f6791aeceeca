/**
 * Real roots in [−1, 1] of a Chebyshev series Σ c_m T_m(x) (or Σ c_m U_m(x)) as eigenvalues of
 * its colleague matrix. Unlike a conversion to powers of x, whose coefficients grow like 2^m and
 * cancel, this stays well conditioned at any degree: the route for high-order sampled loops
 * (a long whole-sample delay folded into the denominator makes the order climb quickly).
 */
import { balance, hqr } from './hqr';
import { aberth } from './aberth';

const NEAR_REAL = 1e-6;

export function chebyshevRealRoots(coefficients: readonly number[], kind: 'T' | 'U'): number[] {
	const c = coefficients.slice();
	let scale = 0;
	for (const x of c) scale = Math.max(scale, Math.abs(x));
	if (scale === 0) return [];
	// a negligible top coefficient would put spurious huge eigenvalues in the matrix
	while (c.length > 1 && Math.abs(c[c.length - 1]) <= 1e-15 * scale) c.pop();
	const n = c.length - 1;
	if (n < 1) return [];
	if (n === 1) {
		// c0 + c1·x (T) or c0 + 2c1·x (U)
		const x = -c[0] / (kind === 'T' ? c[1] : 2 * c[1]);
		return Math.abs(x) <= 1 + NEAR_REAL ? [x] : [];
	}
	// colleague matrix C (x·P = C·P at a root), stored transposed: tridiagonal plus a full last
	// column, i.e. upper Hessenberg, as hqr wants
	const w = n + 1;
	const a = new Float64Array(w * w);
	const set = (row: number, col: number, v: number) => (a[(col + 1) * w + row + 1] = v);
	set(0, 1, kind === 'T' ? 1 : 0.5);
	for (let m = 1; m < n - 1; m++) {
		set(m, m - 1, 0.5);
		set(m, m + 1, 0.5);
	}
	for (let j = 0; j < n; j++) set(n - 1, j, (j === n - 2 ? 0.5 : 0) - c[j] / (2 * c[n]));
	const re = new Float64Array(n);
	const im = new Float64Array(n);
	const h = a.slice();
	balance(h, n);
	if (!hqr(h, n, re, im)) {
		const r = aberth(toPower(c, kind));
		re.set(r.re);
		im.set(r.im);
	}
	const out: number[] = [];
	for (let i = 0; i < n; i++)
		if (Math.abs(im[i]) <= NEAR_REAL && im[i] >= 0 && Math.abs(re[i]) <= 1 + NEAR_REAL)
			out.push(Math.max(-1, Math.min(1, re[i])));
	return out;
}

/** Last resort only (the colleague QR did not converge): power-basis coefficients. */
function toPower(c: number[], kind: 'T' | 'U'): number[] {
	let prev = [1];
	let cur = kind === 'T' ? [0, 1] : [0, 2];
	const out = new Array<number>(c.length).fill(0);
	out[0] += c[0];
	for (let i = 0; i < cur.length; i++) out[i] += (c[1] ?? 0) * cur[i];
	for (let m = 2; m < c.length; m++) {
		const next = new Array<number>(m + 1).fill(0);
		for (let i = 0; i < cur.length; i++) next[i + 1] += 2 * cur[i];
		for (let i = 0; i < prev.length; i++) next[i] -= prev[i];
		[prev, cur] = [cur, next];
		for (let i = 0; i < cur.length; i++) out[i] += c[m] * cur[i];
	}
	return out;
}
