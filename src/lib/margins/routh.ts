/**
 * Counting unstable closed-loop poles without computing them: the Routh array (continuous) and
 * the bilinear map z = (1 + s)/(1 − s) followed by Routh (sampled). Used by the gain-margin walk,
 * which probes gains well inside the intervals between candidates, away from the boundary, where
 * the count is well conditioned; any near-zero pivot returns null and the caller computes roots.
 */
import { maxAbs, trim, type Poly } from './polynomial';
import { bilinearFromShifted } from './shifted';

const PIVOT = 1e-10;
/** Beyond this order the array's growth makes root finding the safer count. */
const MAX_ORDER = 16;

/** Roots with Re ≥ 0 of p (ascending), or null when the array is degenerate or too large. */
export function routhUnstable(p: Poly): number | null {
	const q = trim(p);
	const n = q.length - 1;
	if (n > MAX_ORDER) return null;
	if (n <= 0) return 0;
	if (q[0] === 0) return null; // a root at the origin is on the boundary
	let a: number[] = [];
	let b: number[] = [];
	for (let i = 0; i <= n; i++) (i % 2 === 0 ? a : b).push(q[n - i]);
	let changes = 0;
	let prevSign = Math.sign(a[0]);
	for (let row = 1; row <= n; row++) {
		const size = Math.max(maxAbs(a), maxAbs(b));
		if (Math.abs(b[0]) <= PIVOT * size) return null;
		const sign = Math.sign(b[0]);
		if (sign !== prevSign) changes++;
		prevSign = sign;
		const next: number[] = [];
		for (let j = 0; j + 1 < a.length; j++) next.push(a[j + 1] - (a[0] / b[0]) * (b[j + 1] ?? 0));
		// rescale: the array's entries otherwise drift towards overflow or underflow
		const s = maxAbs(next) || 1;
		[a, b] = [b, next.map((x) => x / s)];
	}
	return changes;
}

/**
 * Roots with |z| ≥ 1 of a polynomial given in powers of w = z − 1, or null (degenerate, or a root
 * near z = −1 that the map sends to infinity). Clustered roots at z = 1 survive the map.
 */
export function schurUnstable(pw: Poly): number | null {
	const q = trim(pw);
	if (q.length - 1 > MAX_ORDER) return null;
	const s = trim(bilinearFromShifted(q));
	if (s.length !== q.length) return null;
	// the leading coefficient is (−1)^n p(−1): near zero means a root near z = −1
	if (Math.abs(s[s.length - 1]) <= PIVOT * maxAbs(s)) return null;
	return routhUnstable(s);
}
