/**
 * Roots of real polynomials: closed forms up to degree 2; otherwise Aberth–Ehrlich from
 * Newton-polygon starts when its roots certify (aberth.ts), else the eigenvalues of the balanced
 * companion matrix by Francis QR; when QR does not converge, numeric.eig on the same matrix, and
 * when that throws (it does on xⁿ − c), Aberth–Ehrlich from plain starts. Every root is then
 * checked against the polynomial itself and Newton-polished when its residual is not at rounding
 * level.
 */
import numeric from 'numeric';
import { aberth, certifiedAberth } from './aberth';
import { hqr } from './hqr';
import { lowOrder, sumAbs, trim, type Poly } from './polynomial';
import { shiftTo } from './shifted';
import { hypot } from './hypot';
import { typedParts } from './buffers';

export interface Roots {
	re: Float64Array;
	im: Float64Array;
	/** 1 − re for roots of a sampled loop, when known more precisely than by subtraction. */
	offRe?: Float64Array;
	/** Roots at z = 1 up to the rounding of the coefficients they came from (a written-out integrator). */
	atOne?: number;
}

const EMPTY: Roots = { re: new Float64Array(0), im: new Float64Array(0) };

export function polyRoots(p: Poly): Roots {
	const full = trim(p);
	if (full.length <= 1) return EMPTY;
	const atZero = lowOrder(full);
	const q = atZero ? full.slice(atZero) : full;
	const n = q.length - 1;
	const [re, im] = typedParts(n + atZero, 2);
	if (n === 1) re[0] = -q[0] / q[1];
	else if (n === 2) quadratic(q, re, im);
	else if (n > 2) {
		// the first n entries take the roots of q; the ones at the origin stay 0
		companionRoots(q, re, im);
		polish(q, re, im, n);
	}
	return { re, im };
}

/**
 * Roots of a z-domain polynomial, found in w = z − 1 from coefficients shifted exactly (roots
 * clustered at z = 1 keep their relative precision, and 1 − z comes out without cancellation).
 * A value p(1) at the level of the coefficients' rounding is a sampled integrator written out as
 * coefficients: the roots stay those of the polynomial as written, but `atOne` records it, so
 * that L(z = 1) is taken as infinite rather than as the huge finite value rounding left.
 */
export function zRoots(p: Poly, zeros = false): Roots {
	const q = trim(p);
	return wRoots(shiftTo(q, 1), zeros, sumAbs(q));
}

/**
 * The same from coefficients already in powers of w = z − 1 (`size`: the scale their rounding is
 * relative to). `zeros`: a numerator's zeros at z = −1 that rounding split into a cluster (a
 * Tustin map's, written out) are put back exactly, so that L is 0 at the Nyquist frequency.
 */
export function wRoots(a: Poly, zeros = false, size = sumAbs(a)): Roots {
	const atOne = a[0] === 0 || Math.abs(a[0]) > 8 * Number.EPSILON * size ? 0 : 1;
	let rest = trim(a);
	let minusOnes = 0;
	if (zeros) {
		const v = shiftTo(rest, -2);
		const scale = sumAbs(v);
		while (minusOnes < v.length - 1 && Math.abs(v[minusOnes]) <= 64 * Number.EPSILON * scale)
			minusOnes++;
		for (let k = 0; k < minusOnes; k++) rest = deflate(rest, -2);
	}
	const w = polyRoots(rest);
	const n = w.re.length + minusOnes;
	const [re, im, offRe] = typedParts(n, 3);
	re.fill(-1);
	offRe.fill(2);
	for (let i = 0; i < w.re.length; i++) {
		re[i] = 1 + w.re[i];
		im[i] = w.im[i];
		offRe[i] = -w.re[i];
	}
	return { re, im, offRe, atOne };
}

/** p(x)/(x − r), dropping the (rounding-sized) remainder. */
function deflate(p: Poly, r: number): Poly {
	const out = new Array<number>(p.length - 1);
	let carry = 0;
	for (let i = p.length - 1; i >= 1; i--) {
		carry = p[i] + carry * r;
		out[i - 1] = carry;
	}
	return out;
}

function quadratic(q: Poly, re: Float64Array, im: Float64Array): void {
	const s = Math.max(Math.abs(q[0]), Math.abs(q[1]), Math.abs(q[2]));
	const [c, b, a] = [q[0] / s, q[1] / s, q[2] / s];
	const disc = b * b - 4 * a * c;
	if (disc >= 0) {
		// the sign choice avoids cancellation; the second root follows from Vieta
		const t = -0.5 * (b + (b >= 0 ? Math.sqrt(disc) : -Math.sqrt(disc)));
		re[0] = t / a;
		re[1] = t !== 0 ? c / t : 0;
	} else {
		re[0] = re[1] = -b / (2 * a);
		im[0] = Math.sqrt(-disc) / (2 * Math.abs(a));
		im[1] = -im[0];
	}
}

/**
 * The companion matrix of q (1-based, for hqr), balanced. A companion matrix has only its first
 * row and its subdiagonal off the diagonal, and a diagonal similarity keeps that shape, so the
 * balancing runs on those 2n − 1 entries: the same sums in the same order, the same powers of
 * two as `balance` on the full matrix (bit for bit), at O(n) per sweep instead of O(n²). The
 * entries are balanced in place in the matrix itself (row 1 and the subdiagonal).
 */
function companion(q: Poly, n: number): Float64Array {
	const w = n + 1;
	const a = new Float64Array(w * w);
	// a[1][k] at w + k, a[k + 1][k] at (k + 1)·w + k
	for (let k = 1; k <= n; k++) {
		a[w + k] = -q[n - k] / q[n];
		if (k < n) a[(k + 1) * w + k] = 1;
	}
	for (let sweep = 0; sweep < 200; sweep++) {
		let done = true;
		for (let i = 1; i <= n; i++) {
			let c: number;
			let r = 0;
			if (i === 1) {
				c = n > 1 ? Math.abs(a[2 * w + 1]) : 0;
				for (let j = 2; j <= n; j++) r += Math.abs(a[w + j]);
			} else {
				c = Math.abs(a[w + i]) + (i < n ? Math.abs(a[(i + 1) * w + i]) : 0);
				r = Math.abs(a[i * w + i - 1]);
			}
			if (c === 0 || r === 0) continue;
			const s = c + r;
			const f = scaleFactor(c, r);
			if ((c * f * f + r) / f < 0.95 * s) {
				done = false;
				const gi = 1 / f;
				// row i by 1/f, column i by f (the diagonal entry keeps its value)
				if (i === 1) for (let j = 2; j <= n; j++) a[w + j] *= gi;
				else {
					a[i * w + i - 1] *= gi;
					a[w + i] *= f;
				}
				if (i < n) a[(i + 1) * w + i] *= f;
			}
		}
		if (done) break;
	}
	return a;
}

/**
 * The power of two f that balancing picks for column sum c and row sum r: doubled while
 * c·f² < r/2, halved while c·f² > 2r (EISPACK's loops, by a factor 4 on c per step). The step
 * count is estimated from the exponents and then checked by the loops themselves, which keeps
 * the result exactly theirs (products by powers of two are exact) at a few steps instead of up
 * to 500 for coefficients that span many decades.
 */
function scaleFactor(c: number, r: number): number {
	let f = 1;
	const g = r / 2;
	if (c < g) {
		const k = Math.floor(Math.log2(g / c) / 2) - 1;
		if (k > 1 && k < 490) {
			f = 2 ** k;
			c *= f * f;
		}
		while (c < g && f < 1e150) {
			f *= 2;
			c *= 4;
		}
	}
	const h = r * 2;
	if (c > h) {
		const k = Math.floor(Math.log2(c / h) / 2) - 1;
		if (k > 1 && k < 490 && f / 2 ** k > 1e-150) {
			const d = 2 ** k;
			f /= d;
			c /= d * d;
		}
		while (c > h && f > 1e-150) {
			f /= 2;
			c /= 4;
		}
	}
	return f;
}

/**
 * Up to this degree Aberth's iteration from Newton-polygon starts is tried first: on the
 * crossover and characteristic polynomials of the loops we see it takes about half the time of
 * the companion matrix's QR. Beyond it (long folded delays), and whenever its roots do not
 * certify, QR.
 */
const ABERTH_MAX = 20;

/** The roots of q (degree n > 2, q[0] ≠ 0) into re/im[0..n). */
function companionRoots(q: Poly, re: Float64Array, im: Float64Array): void {
	const n = q.length - 1;
	if (n <= ABERTH_MAX && certifiedAberth(q, re, im) && realPairs(re, im, n)) return;
	if (hqr(companion(q, n), n, re, im) && allFinite(re) && allFinite(im)) return;
	try {
		// hqr overwrote the matrix: rebuild it for the second opinion
		const fresh = companion(q, n);
		const m: number[][] = [];
		for (let i = 1; i <= n; i++)
			m.push(Array.from(fresh.subarray(i * (n + 1) + 1, (i + 1) * (n + 1))));
		const { lambda } = numeric.eig(m);
		const x = lambda.x as number[];
		const y = (lambda.y as number[] | undefined) ?? [];
		for (let i = 0; i < n; i++) {
			re[i] = x[i];
			im[i] = y[i] ?? 0;
		}
		if (allFinite(re) && allFinite(im)) return;
	} catch {
		// numeric.eig reports "internal error" on some companion matrices; Aberth does not care
	}
	const r = pairConjugates(aberth(q));
	re.set(r.re);
	im.set(r.im);
}

function allFinite(x: Float64Array): boolean {
	for (let i = 0; i < x.length; i++) if (!Number.isFinite(x[i])) return false;
	return true;
}

/** Relative residual |q(z)| / Σ|q_i||z|^i: rounding level (~n·eps) for a root of q. */
export function residual(q: Poly, zr: number, zi: number): number {
	let pr = 0;
	let pi = 0;
	let sc = 0;
	const az = hypot(zr, zi);
	for (let i = q.length - 1; i >= 0; i--) {
		const t = pr * zr - pi * zi + q[i];
		pi = pr * zi + pi * zr;
		pr = t;
		sc = sc * az + Math.abs(q[i]);
	}
	return sc === 0 ? 0 : hypot(pr, pi) / sc;
}

function newtonStep(q: Poly, zr: number, zi: number): [number, number] {
	let pr = 0;
	let pi = 0;
	let dr = 0;
	let di = 0;
	for (let i = q.length - 1; i >= 0; i--) {
		const tr = dr * zr - di * zi + pr;
		di = dr * zi + di * zr + pi;
		dr = tr;
		const t = pr * zr - pi * zi + q[i];
		pi = pr * zi + pi * zr;
		pr = t;
	}
	const d = dr * dr + di * di;
	if (d === 0) return [zr, zi];
	return [zr - (pr * dr + pi * di) / d, zi - (pi * dr - pr * di) / d];
}

const RESIDUAL_OK = 1e-13;

function polish(q: Poly, re: Float64Array, im: Float64Array, n: number): void {
	let bad = 0;
	let moved = false;
	for (let k = 0; k < n; k++) {
		let r = residual(q, re[k], im[k]);
		for (let step = 0; step < 4 && r > RESIDUAL_OK; step++) {
			const [nr, ni] = newtonStep(q, re[k], im[k]);
			const rn = residual(q, nr, ni);
			if (!(rn < r)) break;
			re[k] = nr;
			im[k] = im[k] === 0 ? 0 : ni;
			r = rn;
			moved = true;
		}
		if (r > 1e-6) bad++;
	}
	// QR returns exact conjugate pairs; only Newton can have broken one
	if (moved) pairConjugates({ re, im });
	if (bad > 0) {
		const better = pairConjugates(aberth(q, { re: re.slice(0, n), im: im.slice(0, n) }));
		let worse = 0;
		let improved = 0;
		for (let k = 0; k < n; k++) {
			worse += residual(q, re[k], im[k]);
			improved += residual(q, better.re[k], better.im[k]);
		}
		if (improved < worse) {
			re.set(better.re);
			im.set(better.im);
		}
	}
}

/**
 * Aberth's roots of a real polynomial, made real or exactly conjugate as QR's are: a root within
 * rounding of the real axis becomes real; every other one must have a conjugate partner within
 * rounding (the pair is averaged). False when one has none: the roots are then left to QR, rather
 * than two close real roots (a nearly tangent crossing) being merged into a pair.
 */
function realPairs(re: Float64Array, im: Float64Array, n: number): boolean {
	for (let i = 0; i < n; i++) if (Math.abs(im[i]) <= 1e-12 * hypot(re[i], im[i])) im[i] = 0;
	const taken = new Uint8Array(n);
	for (let i = 0; i < n; i++) {
		if (taken[i] || im[i] === 0) continue;
		let best = -1;
		let bestD = Infinity;
		for (let j = i + 1; j < n; j++) {
			if (taken[j] || im[j] === 0 || im[j] > 0 === im[i] > 0) continue;
			const d = hypot(re[j] - re[i], im[j] + im[i]);
			if (d < bestD) {
				best = j;
				bestD = d;
			}
		}
		if (best < 0 || bestD > 1e-10 * hypot(re[i], im[i])) return false;
		taken[i] = taken[best] = 1;
		const a = 0.5 * (re[i] + re[best]);
		const b = 0.5 * (Math.abs(im[i]) + Math.abs(im[best]));
		re[i] = re[best] = a;
		im[i] = im[i] > 0 ? b : -b;
		im[best] = -im[i];
	}
	return true;
}

/** Aberth's roots of a real polynomial are conjugate only up to rounding: make pairs exact. */
function pairConjugates(r: Roots): Roots {
	const n = r.re.length;
	const used = new Uint8Array(n);
	for (let i = 0; i < n; i++) {
		if (used[i]) continue;
		const scale = hypot(r.re[i], r.im[i]);
		if (Math.abs(r.im[i]) <= 1e-12 * scale) {
			r.im[i] = 0;
			used[i] = 1;
			continue;
		}
		let best = -1;
		let bestD = Infinity;
		for (let j = i + 1; j < n; j++) {
			if (used[j]) continue;
			const d = hypot(r.re[j] - r.re[i], r.im[j] + r.im[i]);
			if (d < bestD) {
				best = j;
				bestD = d;
			}
		}
		used[i] = 1;
		if (best >= 0 && bestD <= 1e-6 * scale) {
			used[best] = 1;
			const a = 0.5 * (r.re[i] + r.re[best]);
			const b = 0.5 * (Math.abs(r.im[i]) + Math.abs(r.im[best]));
			r.re[i] = r.re[best] = a;
			r.im[i] = b;
			r.im[best] = -b;
		}
	}
	return r;
}
