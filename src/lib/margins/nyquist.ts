/**
 * The Nyquist criterion Z = N + P for loops whose closed-loop poles cannot be computed (transport
 * delay, measured data). N, the clockwise encirclements of −1 by k·L along the Nyquist contour,
 * is counted as signed crossings of the ray (−∞, −1):
 *  - each phase crossover on 0 < ω < end with k|L| > 1 counts +1 when the phase falls through
 *    −180° (mod 360°), −1 when it rises; the mirror half of the contour doubles this;
 *  - a pole on the boundary is passed by an indentation to its right (so it is not counted in P):
 *    on that arc L sweeps m·180° clockwise at infinite radius, and every odd multiple of 180° it
 *    passes is one more clockwise crossing (doubled for a pole pair ±jω₀);
 *  - the ends of the band (ω → 0 and ω → ∞ or the Nyquist frequency) close the curve onto its
 *    mirror image: by such an arc when poles sit there, else by a short chord through the real axis.
 */
import type { Crossing } from './crossovers';
import { hypot } from './hypot';

export interface PhaseCrossing extends Crossing {
	/** +1 where the phase falls through an odd multiple of 180°, −1 where it rises, 0 tangent. */
	dir: number;
	/** True for the ω → 0 and Nyquist end points (their contribution is in the closures). */
	end?: boolean;
}

/** How the curve closes at one end of the band. */
export type Closure =
	{ kind: 'arc'; crossings: number } | { kind: 'chord'; re: number; imSign: number; sign: 1 | -1 };

export interface NyquistCount {
	/** Open-loop poles strictly unstable (not on the boundary), plus hidden unstable modes. */
	P: number;
	crossings: PhaseCrossing[];
	/** Clockwise crossings at infinite radius from indentations inside the band (one side). */
	interiorArcs: number;
	low: Closure;
	high: Closure;
	/** |L(∞)| of a delayed biproper loop: k·|L(∞)| ≥ 1 encircles −1 infinitely often. */
	neutral: number;
}

/** Odd multiples of π strictly between a and b. */
export function oddMultiplesBetween(a: number, b: number): number {
	const lo = Math.min(a, b);
	const hi = Math.max(a, b);
	// odd multiples (2j+1)π in (lo, hi)
	const first = Math.floor((lo / Math.PI - 1) / 2) + 1;
	const last = Math.ceil((hi / Math.PI - 1) / 2) - 1;
	return Math.max(0, last - first + 1);
}

/**
 * The clockwise sweep S ≈ m·π of an indentation arc: S ≡ (start − end) modulo 2π, taken nearest m·π.
 * Returns the number of odd multiples of π the arc passes.
 */
export function arcCrossings(start: number, end: number, m: number): number {
	let s = start - end;
	const target = m * Math.PI;
	s += 2 * Math.PI * Math.round((target - s) / (2 * Math.PI));
	return oddMultiplesBetween(end, end + s);
}

function closureCount(c: Closure, k: number): number {
	if (c.kind === 'arc') return c.crossings;
	return k * c.re < -1 ? c.sign * c.imSign : 0;
}

/** Closed-loop unstable poles Z at gain k (Infinity for a neutral loop beyond its limit). */
export function unstableCount(n: NyquistCount, k: number): number {
	if (n.neutral > 0 && k * n.neutral >= 1) return Infinity;
	let z = n.P + 2 * n.interiorArcs + closureCount(n.low, k) + closureCount(n.high, k);
	for (const c of n.crossings) if (!c.end && k * hypot(c.re, c.im) > 1) z += 2 * c.dir;
	return z;
}
