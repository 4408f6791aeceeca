/**
 * A cheap certificate that a polynomial has no root a crossover search would look at, so its
 * eigenvalues need not be computed. Obreshkoff's theorem: the number of roots in the sector
 * |arg x| < π/(n + 2) is at most the number of sign changes of the coefficients (Descartes); on
 * a segment [0, B], the same holds for the lens over it after x = B·t/(1 + t). The crossover
 * search only ever takes roots within 1e-2 (relative) of the real axis, well inside both.
 *
 * Rounding: a coefficient that is small against its own terms (or against the largest
 * coefficient) could have either sign, and then nothing is certified.
 */
import type { Poly } from './polynomial';

const SURE = 1e-10;

/** True when p (ascending) certainly has no root with |arg x| < π/(n + 2), x ≠ 0. */
export function noPositiveRoots(p: Poly): boolean {
	let max = 0;
	for (const c of p) max = Math.max(max, Math.abs(c));
	if (max === 0) return false;
	let sign = 0;
	for (const c of p) {
		if (c === 0) continue;
		if (Math.abs(c) <= SURE * max) return false;
		const s = c > 0 ? 1 : -1;
		if (sign !== 0 && s !== sign) return false;
		sign = s;
	}
	return true;
}

/**
 * True when p (ascending) certainly has no root in the lens over [0, B] (0 excluded) whose
 * boundary meets the segment at π/(n + 2): the coefficients of (1 + t)ⁿ·p(B·t/(1 + t)) all have
 * one sign, each by a clear margin over the rounding of the sum that formed it.
 */
export function noRootsOnSegment(p: Poly, B: number): boolean {
	const n = p.length - 1;
	if (n < 1) return false;
	// q_j = Σ_{i ≤ j} p_i B^i C(n − i, j − i); the same sum over |terms| bounds its rounding
	let sign = 0;
	let power = 1;
	const q = new Float64Array(n + 1);
	const size = new Float64Array(n + 1);
	for (let i = 0; i <= n; i++) {
		const a = p[i] * power;
		let binom = 1;
		for (let j = i; j <= n; j++) {
			q[j] += a * binom;
			size[j] += Math.abs(a) * binom;
			binom = (binom * (n - j)) / (j - i + 1);
		}
		power *= B;
	}
	let max = 0;
	for (let j = 0; j <= n; j++) max = Math.max(max, size[j]);
	if (max === 0) return false;
	for (let j = 0; j <= n; j++) {
		const c = q[j];
		if (!(Math.abs(c) > SURE * size[j] && Math.abs(c) > 1e-14 * max)) return false;
		const s = c > 0 ? 1 : -1;
		if (sign !== 0 && s !== sign) return false;
		sign = s;
	}
	return true;
}
