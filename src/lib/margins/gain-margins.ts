/**
 * The stable gain interval (k_low, k_high) ∋ 1. The closed loop can only change stability where
 * 1 + k·L has a root on the boundary, i.e. at k = 1/|L| of a phase crossover (ω = 0 and the
 * Nyquist or infinite frequency included) — and at every such k it HAS a root on the boundary:
 * L(jω) real and negative there makes 1 + k·L(jω) = 0, a closed-loop pole on the imaginary axis
 * (or the unit circle; for the candidate at ω → ∞, a pole through infinity), which the
 * definition counts as unstable. So the nearest candidate on each side bounds the interval,
 * whatever the loop does beyond it: a phase curve that only touches −180° (a tangent phase
 * crossover, stable on both sides of its gain) bounds it too, at the one gain where the loop sits
 * on the edge. (Up to an earlier version it did not: only a candidate beyond which a root count
 * said "unstable" did, which leaves that edge gain inside the "stable" interval.)
 */
import { hypot } from './hypot';
import { sortSmall } from './small-sort';

export interface GainCandidate {
	k: number;
	/** Internal frequency of the crossover: ω (rad/s), θ (rad), or Infinity. */
	f: number;
}

export interface GainInterval {
	high: GainCandidate | null;
	low: GainCandidate | null;
}

export function gainCandidates(
	phase: { f: number; re: number; im: number }[],
	extra: GainCandidate[] = []
): GainCandidate[] {
	const out = [...extra];
	for (const p of phase) {
		const mag = hypot(p.re, p.im);
		if (mag > 0 && Number.isFinite(mag)) out.push({ k: 1 / mag, f: p.f });
	}
	return sortSmall(out, (a, b) => a.k - b.k);
}

export function gainInterval(candidates: GainCandidate[]): GainInterval {
	let high: GainCandidate | null = null;
	let low: GainCandidate | null = null;
	for (const c of candidates) {
		if (c.k > 1 && (high === null || c.k < high.k)) high = c;
		if (c.k < 1 && (low === null || c.k > low.k)) low = c;
	}
	return { high, low };
}
