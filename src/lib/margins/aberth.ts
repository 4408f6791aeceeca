/**
 * Aberth–Ehrlich simultaneous root iteration, twice: `certifiedAberth`, the first try for the
 * roots of low-degree polynomials (Newton-polygon starts, cheaper than QR on a companion matrix,
 * and refused unless its roots certify), and `aberth`, the fallback when the companion-matrix QR
 * does not converge (globally convergent in practice and indifferent to the matrix structure that
 * stalls QR).
 */
import { hypot } from './hypot';
import { filled } from './buffers';

/** Roots of p (ascending, p[n] ≠ 0). Starts from `start` when given (e.g. rough QR roots). */
export function aberth(
	p: readonly number[],
	start?: { re: Float64Array; im: Float64Array }
): { re: Float64Array; im: Float64Array } {
	const n = p.length - 1;
	const re = new Float64Array(n);
	const im = new Float64Array(n);
	const dp = new Float64Array(n);
	for (let i = 1; i <= n; i++) dp[i - 1] = i * p[i];
	if (start) {
		re.set(start.re);
		im.set(start.im);
	} else {
		// radius from the coefficients' geometric growth; angles offset so no guess is real
		let radius = 0;
		for (let i = 0; i < n; i++)
			radius = Math.max(radius, Math.pow(Math.abs(p[i] / p[n]), 1 / (n - i)));
		if (!(radius > 0)) radius = 1;
		for (let k = 0; k < n; k++) {
			const a = (2 * Math.PI * k) / n + 0.4;
			re[k] = radius * Math.cos(a);
			im[k] = radius * Math.sin(a);
		}
	}
	const done = new Uint8Array(n);
	for (let iter = 0; iter < 800; iter++) {
		let moving = 0;
		for (let k = 0; k < n; k++) {
			if (done[k]) continue;
			const zr = re[k];
			const zi = im[k];
			// p(z) and p'(z) by Horner
			let pr = p[n];
			let pi = 0;
			for (let i = n - 1; i >= 0; i--) {
				const t = pr * zr - pi * zi + p[i];
				pi = pr * zi + pi * zr;
				pr = t;
			}
			let qr = dp[n - 1];
			let qi = 0;
			for (let i = n - 2; i >= 0; i--) {
				const t = qr * zr - qi * zi + dp[i];
				qi = qr * zi + qi * zr;
				qr = t;
			}
			if (pr === 0 && pi === 0) {
				done[k] = 1;
				continue;
			}
			// ratio = p/p'
			const qd = qr * qr + qi * qi;
			let rr: number;
			let ri: number;
			if (qd === 0) {
				rr = 1e-3 * (1 + Math.abs(zr));
				ri = 1e-3 * (1 + Math.abs(zi));
			} else {
				rr = (pr * qr + pi * qi) / qd;
				ri = (pi * qr - pr * qi) / qd;
			}
			const step = aberthStep(re, im, n, k, rr, ri);
			if (step <= 1e-15 * (hypot(zr, zi) + 1e-300)) done[k] = 1;
			else moving++;
		}
		if (moving === 0) break;
	}
	return { re, im };
}

/**
 * Moves root k by Aberth's correction ratio / (1 − ratio·Σ_(j≠k) 1/(z_k − z_j)), from the Newton
 * ratio p/p′ = (rr, ri) at it; returns the length of the step. A correction that is not finite
 * leaves the root where it was and returns NaN.
 */
export function aberthStep(
	re: Float64Array,
	im: Float64Array,
	n: number,
	k: number,
	rr: number,
	ri: number
): number {
	const zr = re[k];
	const zi = im[k];
	let sr = 0;
	let si = 0;
	for (let j = 0; j < n; j++) {
		if (j === k) continue;
		const dr = zr - re[j];
		const di = zi - im[j];
		const d = dr * dr + di * di;
		if (d === 0) continue;
		// one division per term, not two: divisions are this loop's cost
		const inv = 1 / d;
		sr += dr * inv;
		si -= di * inv;
	}
	const br = 1 - (rr * sr - ri * si);
	const bi = -(rr * si + ri * sr);
	const bd = br * br + bi * bi;
	const ib = 1 / bd;
	const wr = bd === 0 ? rr : (rr * br + ri * bi) * ib;
	const wi = bd === 0 ? ri : (ri * br - rr * bi) * ib;
	if (!Number.isFinite(wr) || !Number.isFinite(wi)) return NaN;
	re[k] = zr - wr;
	im[k] = zi - wi;
	return hypot(wr, wi);
}

const EPS = 2.220446049250313e-16;
/** Sweeps allowed before the fast path gives up and the caller falls back to QR. */
const FAST_SWEEPS = 40;
/** Inclusion-disc radius, relative to its root, below which a root is taken as certified. */
const CERTIFIED = 1e-6;

// Start directions: off the real axis (0.7 rad), m starts a turn of 2π/m apart along an edge
// of the polygon, and each edge rotated by the golden angle from the last, so that no start is
// real and no two coincide. Constants, so that no start costs a cosine or a sine.
const START_COS = Math.cos(0.7);
const START_SIN = Math.sin(0.7);
const EDGE_COS = Math.cos(Math.PI * (3 - Math.sqrt(5)));
const EDGE_SIN = Math.sin(Math.PI * (3 - Math.sqrt(5)));
const TURNS = 32;
const TURN_COS = Float64Array.from({ length: TURNS }, (_, m) => Math.cos((2 * Math.PI) / m));
const TURN_SIN = Float64Array.from({ length: TURNS }, (_, m) => Math.sin((2 * Math.PI) / m));

/**
 * Starting points on circles from the Newton polygon of p (ascending): the upper convex hull of
 * (i, ln|p_i|). Each hull edge from k to k + m holds m roots of modulus about
 * (|p_k|/|p_(k+m)|)^(1/m), so roots spread over many decades start near their own size.
 */
function newtonPolygonStarts(p: readonly number[], re: Float64Array, im: Float64Array): void {
	const n = p.length - 1;
	const lg = filled(n + 1);
	for (let i = 0; i <= n; i++) lg[i] = p[i] === 0 ? -Infinity : Math.log(Math.abs(p[i]));
	// the hull as a stack of indices
	const hull = new Int32Array(n + 1);
	let top = 0;
	for (let i = 0; i <= n; i++) {
		if (lg[i] === -Infinity) continue;
		// pop while the last two hull points and i make a non-right turn (keep the upper hull)
		while (top >= 2) {
			const a = hull[top - 2];
			const b = hull[top - 1];
			if ((lg[b] - lg[a]) * (i - a) <= (lg[i] - lg[a]) * (b - a)) top--;
			else break;
		}
		hull[top++] = i;
	}
	let k = 0;
	// (cr, ci): the unit direction of each edge's first start, turned by the golden angle per edge
	let cr = START_COS;
	let ci = START_SIN;
	for (let e = 0; e + 1 < top; e++) {
		const m = hull[e + 1] - hull[e];
		const radius = Math.exp((lg[hull[e]] - lg[hull[e + 1]]) / m);
		let c = radius * cr;
		let s = radius * ci;
		const dc = m < TURNS ? TURN_COS[m] : Math.cos((2 * Math.PI) / m);
		const ds = m < TURNS ? TURN_SIN[m] : Math.sin((2 * Math.PI) / m);
		for (let t = 0; t < m; t++) {
			re[k] = c;
			im[k] = s;
			k++;
			const next = c * dc - s * ds;
			s = c * ds + s * dc;
			c = next;
		}
		const next = cr * EDGE_COS - ci * EDGE_SIN;
		ci = cr * EDGE_SIN + ci * EDGE_COS;
		cr = next;
	}
}

/**
 * All roots of p (ascending, degree n ≥ 1, p[0] ≠ 0 and p[n] ≠ 0) by Aberth–Ehrlich from
 * Newton-polygon starts, into re/im[0..n). Each root stops once its residual is at the rounding
 * level of Horner's rule; true only when every root did within FAST_SWEEPS sweeps and the
 * Weierstrass inclusion discs certify them: the disc of radius n·|p(z_k)/(p_n Π_(j≠k)(z_k − z_j))|
 * around z_k is small against |z_k| (an approximation that duplicates another's root, leaving a
 * root unfound, gets a disc as wide as the gap to the missing root). False: use another method.
 */
export function certifiedAberth(p: readonly number[], re: Float64Array, im: Float64Array): boolean {
	const n = p.length - 1;
	newtonPolygonStarts(p, re, im);
	const done = new Uint8Array(n);
	// p at each root where it stopped, for the certificate
	const valRe = filled(n);
	const valIm = filled(n);
	const tol = 4 * (n + 1) * EPS;
	let left = n;
	for (let sweep = 0; sweep < FAST_SWEEPS && left > 0; sweep++) {
		for (let k = 0; k < n; k++) {
			if (done[k]) continue;
			const zr = re[k];
			const zi = im[k];
			const az = Math.sqrt(zr * zr + zi * zi);
			// p, p′ and Σ|p_i||z|^i (the scale of Horner's rounding) in one pass
			let pr = p[n];
			let pi = 0;
			let dr = 0;
			let di = 0;
			let size = Math.abs(p[n]);
			for (let i = n - 1; i >= 0; i--) {
				const tr = dr * zr - di * zi + pr;
				di = dr * zi + di * zr + pi;
				dr = tr;
				const t = pr * zr - pi * zi + p[i];
				pi = pr * zi + pi * zr;
				pr = t;
				size = size * az + Math.abs(p[i]);
			}
			if (!Number.isFinite(size)) return false;
			if (Math.sqrt(pr * pr + pi * pi) <= tol * size) {
				done[k] = 1;
				valRe[k] = pr;
				valIm[k] = pi;
				left--;
				continue;
			}
			const dd = dr * dr + di * di;
			if (dd === 0) {
				// a critical point: nudge off it
				re[k] = zr + 1e-3 * (az + 1);
				im[k] = zi + 1e-3 * (az + 1);
				continue;
			}
			const id = 1 / dd;
			const rr = (pr * dr + pi * di) * id;
			const ri = (pi * dr - pr * di) * id;
			if (!Number.isFinite(aberthStep(re, im, n, k, rr, ri))) return false;
		}
	}
	if (left > 0) return false;
	const lead = p[n];
	for (let k = 0; k < n; k++) {
		const zr = re[k];
		const zi = im[k];
		// W = p(z_k) / (p_n Π (z_k − z_j)), divided factor by factor (no product to overflow)
		let wr = valRe[k] / lead;
		let wi = valIm[k] / lead;
		for (let j = 0; j < n; j++) {
			if (j === k) continue;
			const ar = zr - re[j];
			const ai = zi - im[j];
			const d = ar * ar + ai * ai;
			if (d === 0) return false;
			const t = (wr * ar + wi * ai) / d;
			wi = (wi * ar - wr * ai) / d;
			wr = t;
		}
		const radius = n * Math.sqrt(wr * wr + wi * wi);
		if (!(radius <= CERTIFIED * Math.sqrt(zr * zr + zi * zi))) return false;
	}
	return true;
}
