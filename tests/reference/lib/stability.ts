/**
 * Independent closed-loop stability of rational loops: Routh–Hurwitz for s, and for z the
 * bilinear map z = (1 + w)/(1 − w) followed by Routh. Counts, not just verdicts, so a test can
 * compare the engine's `unstablePoles`.
 */
import { conv } from '../../../scripts/lib/loop-generator';

/**
 * Roots with Re ≥ 0 counted as the sign changes of the Routh array's first column; null when a
 * zero pivot makes the count ambiguous (roots on or symmetric about the imaginary axis).
 */
export function routhUnstable(poly: number[]): number | null {
	let p = poly.slice();
	while (p.length > 1 && p[0] === 0) p = p.slice(1);
	const n = p.length - 1;
	if (n === 0) return 0;
	let r0 = p.filter((_, i) => i % 2 === 0);
	let r1 = p.filter((_, i) => i % 2 === 1);
	const column = [r0[0]];
	for (let k = 0; k < n; k++) {
		if (!(r1[0] !== 0) || !Number.isFinite(r1[0])) return null;
		column.push(r1[0]);
		const next: number[] = [];
		for (let i = 0; i < r0.length - 1; i++)
			next.push(r0[i + 1] - (r0[0] / r1[0]) * (r1[i + 1] ?? 0));
		[r0, r1] = [r1, next];
		if (r1.length === 0 && k < n - 1) return null;
	}
	let changes = 0;
	for (let i = 1; i < column.length; i++)
		if (Math.sign(column[i]) !== Math.sign(column[i - 1])) changes++;
	return changes;
}

/** Strict Hurwitz test: every root has Re < 0 (an ambiguous array counts as not stable). */
export const hurwitzStable = (poly: number[]) => routhUnstable(poly) === 0;

/** Polynomial in w whose left-half-plane roots are the roots |z| < 1 of poly(z), by z = (1 + w)/(1 − w). */
export function bilinear(poly: number[]): number[] {
	const n = poly.length - 1;
	let q = new Array(n + 1).fill(0);
	for (let i = 0; i <= n; i++) {
		// the coefficient of z^(n−i) contributes a·(1 + w)^(n−i)·(1 − w)^i
		let term = [poly[i]];
		for (let k = 0; k < n - i; k++) term = conv(term, [1, 1]);
		for (let k = 0; k < i; k++) term = conv(term, [-1, 1]);
		q = q.map((c, j) => c + term[j]);
	}
	return q;
}

/** Roots with |z| ≥ 1; null when ambiguous (including a root at z = −1, which maps to w = ∞). */
export function schurUnstable(poly: number[]): number | null {
	const q = bilinear(poly);
	if (Math.abs(q[0]) <= 1e-12 * Math.max(...q.map(Math.abs))) return null;
	return routhUnstable(q);
}

export const schurStable = (poly: number[]) => schurUnstable(poly) === 0;

/** Characteristic polynomial den + num of the unity-feedback loop. */
export function characteristic(num: number[], den: number[]): number[] {
	const out = den.slice();
	const off = den.length - num.length;
	num.forEach((c, i) => (out[i + off] += c));
	return out;
}
