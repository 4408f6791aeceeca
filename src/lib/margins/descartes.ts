/**
 * A cheap certificate that a polynomial has no root a crossover search would look at, or exactly
 * one, so its eigenvalues need not be computed. Obreshkoff's theorem: the number of roots in the
 * sector |arg x| < π/(n + 2) is at most the number of sign changes of the coefficients
 * (Descartes); on a segment [0, B], the same holds for the lens over it after x = B·t/(1 + t).
 * The crossover search only ever takes roots within 1e-2 (relative) of the real axis, well inside
 * both. One sign change leaves exactly one root there, and a real one: a complex root would bring
 * its conjugate, and the count of positive roots has the parity of the sign changes.
 *
 * Rounding: a coefficient that is small against its own terms (or against the largest
 * coefficient) could have either sign, and then nothing is certified.
 */
import { brentRoot } from './brent';
import { evalReal, rootBound, type Poly } from './polynomial';
import { filled } from './buffers';

const SURE = 1e-10;

/** Sign changes of p's coefficients (zeros skipped); −1 when a sign is not sure. */
export function signChanges(p: Poly): number {
	let max = 0;
	for (let i = 0; i < p.length; i++) max = Math.max(max, Math.abs(p[i]));
	if (max === 0) return -1;
	let sign = 0;
	let changes = 0;
	for (let i = 0; i < p.length; i++) {
		const c = p[i];
		if (c === 0) continue;
		if (Math.abs(c) <= SURE * max) return -1;
		const s = c > 0 ? 1 : -1;
		if (sign !== 0 && s !== sign) changes++;
		sign = s;
	}
	return changes;
}

/**
 * Sign changes of the coefficients of (1 + t)ⁿ·p(B·t/(1 + t)), each sign sure by a clear margin
 * over the rounding of the sum that formed it; −1 otherwise.
 */
export function segmentSignChanges(p: Poly, B: number): number {
	const n = p.length - 1;
	if (n < 1) return -1;
	// q_j = Σ_{i ≤ j} p_i B^i C(n − i, j − i); the same sum over |terms| bounds its rounding
	let power = 1;
	const q = filled(n + 1);
	const size = filled(n + 1);
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
	if (max === 0) return -1;
	let sign = 0;
	let changes = 0;
	for (let j = 0; j <= n; j++) {
		const c = q[j];
		if (!(Math.abs(c) > SURE * size[j] && Math.abs(c) > 1e-14 * max)) return -1;
		const s = c > 0 ? 1 : -1;
		if (sign !== 0 && s !== sign) changes++;
		sign = s;
	}
	return changes;
}

/** True when p (ascending) certainly has no root with |arg x| < π/(n + 2), x ≠ 0. */
export const noPositiveRoots = (p: Poly): boolean => signChanges(p) === 0;

/**
 * True when p (ascending) certainly has no root in the lens over [0, B] (0 excluded) whose
 * boundary meets the segment at π/(n + 2).
 */
export const noRootsOnSegment = (p: Poly, B: number): boolean => segmentSignChanges(p, B) === 0;

/**
 * The single root of p (ascending, p(0) ≠ 0) in the sector (B = Infinity) or in the lens over
 * [0, B], when its coefficients certify that there is exactly one: it is real and simple, so p
 * changes sign once between 0 and B (or the bound on all roots), and bracketing finds it to full
 * precision. Null when not certified. `changes`: the count for B, when the caller has it.
 */
export function loneRoot(
	p: Poly,
	B: number,
	changes = B === Infinity ? signChanges(p) : segmentSignChanges(p, B)
): number | null {
	if (p.length < 2 || p[0] === 0) return null;
	if (changes !== 1) return null;
	const hi = B === Infinity ? rootBound(p) : B;
	const f0 = p[0];
	const f1 = evalReal(p, hi);
	if (!(f0 * f1 < 0) || !Number.isFinite(hi)) return null;
	return brentRoot((x) => evalReal(p, x), 0, hi, f0, f1);
}
