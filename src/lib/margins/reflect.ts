/**
 * The two halves of the unit circle share their crossover polynomials up to a change of
 * variable: on the circle |z + 1|² = 4 − |z − 1|², so a polynomial P₋ in u' = |z + 1|² and its
 * twin P₊ in u = |z − 1|² (shifted.ts) are one polynomial, P₋(u') = P₊(4 − u'). The eigenvalues
 * of P₊ then also locate the roots P₋ has on the upper half; Newton on P₋ itself, whose
 * coefficients are exact near z = −1, gives them P₋'s own precision, and one eigenvalue problem
 * serves both halves.
 *
 * Every polished root is certified: a disc of radius n·|p(x)|/|p′(x)| around any x holds a root
 * of p (degree n), the evaluation's rounding added to |p(x)|; the discs must be pairwise disjoint
 * (distinct roots), and each root must have stayed near its start, well inside the gap to the
 * next start (it is the root that start stood for, not a neighbour's). When any check fails the
 * answer is null, and the caller solves P₋ on its own.
 */
import type { Poly } from './polynomial';
import { hornerWithDerivative } from './rational-eval';
import type { Roots } from './roots';
import { hypot } from './hypot';
import { typedParts } from './buffers';

const EPS = 2.220446049250313e-16;
const STEPS = 8;

interface Polished {
	re: number;
	im: number;
	radius: number;
}

/** Newton on p from x, then x with the radius of its inclusion disc (Infinity: no certificate). */
function polishOn(p: Poly, xr: number, xi: number): Polished {
	const n = p.length - 1;
	for (let it = 0; it <= STEPS; it++) {
		const [pr, pi, dr, di] = hornerWithDerivative(p, xr, xi);
		const d = dr * dr + di * di;
		if (!(d > 0) || !Number.isFinite(d)) return { re: xr, im: xi, radius: Infinity };
		const sr = (pr * dr + pi * di) / d;
		const si = (pi * dr - pr * di) / d;
		const ax = hypot(xr, xi);
		const converged = hypot(sr, si) <= 4 * EPS * ax;
		if (converged || it === STEPS) {
			// |p| as computed, plus the bound on Horner's rounding
			let size = 0;
			for (let i = n; i >= 0; i--) size = size * ax + Math.abs(p[i]);
			const radius = (n * (hypot(pr, pi) + 2 * (n + 1) * EPS * size)) / Math.sqrt(d);
			return { re: xr, im: xi, radius };
		}
		xr -= sr;
		// a real start stays real: Newton on a real polynomial from a real point
		if (xi !== 0) xi -= si;
	}
	return { re: xr, im: xi, radius: Infinity };
}

/**
 * The roots of `minus` (P₋, ascending in u') that stand for the roots of P₊ with Re u ≥ `from`,
 * i.e. those in the region Re u' ≤ 4 − from that the upper half of the circle looks at. The
 * roots below `from` are left out: P₊, exact near z = 1, has them right, and their twins lie
 * beyond 4 − from. Null when P₋ and P₊ differ in degree or a root does not certify.
 */
export function reflectedRoots(minus: Poly, plus: Roots, degree: number, from = 1.5): Roots | null {
	if (minus.length - 1 !== degree || plus.re.length !== degree) return null;
	const startRe: number[] = [];
	const startIm: number[] = [];
	for (let i = 0; i < plus.re.length; i++) {
		startRe.push(4 - plus.re[i]);
		startIm.push(plus.im[i] === 0 ? 0 : -plus.im[i]);
	}
	const re: number[] = [];
	const im: number[] = [];
	const radius: number[] = [];
	for (let i = 0; i < startRe.length; i++) {
		// one member of each conjugate pair is polished; the other is its mirror image
		if (plus.re[i] < from || startIm[i] < 0) continue;
		const x = polishOn(minus, startRe[i], startIm[i]);
		if (!Number.isFinite(x.radius)) return null;
		let gap = Infinity;
		for (let j = 0; j < startRe.length; j++)
			if (j !== i) gap = Math.min(gap, hypot(startRe[j] - startRe[i], startIm[j] - startIm[i]));
		if (hypot(x.re - startRe[i], x.im - startIm[i]) > 0.25 * gap) return null;
		re.push(x.re);
		im.push(x.im);
		radius.push(x.radius);
		if (x.im !== 0) {
			re.push(x.re);
			im.push(-x.im);
			radius.push(x.radius);
		}
	}
	// a conjugate pair whose discs overlap is no certified pair either
	for (let i = 0; i < re.length; i++)
		for (let j = i + 1; j < re.length; j++)
			if (hypot(re[i] - re[j], im[i] - im[j]) <= radius[i] + radius[j]) return null;
	const [outRe, outIm] = typedParts(re.length, 2);
	for (let i = 0; i < re.length; i++) {
		outRe[i] = re[i];
		outIm[i] = im[i];
	}
	return { re: outRe, im: outIm };
}
