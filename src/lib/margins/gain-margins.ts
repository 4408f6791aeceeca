/**
 * The stable gain interval (k_low, k_high) ∋ 1. The closed loop can only change stability where
 * 1 + k·L has a root on the boundary, i.e. at k = 1/|L| of a phase crossover (ω = 0 and the
 * Nyquist or infinite frequency included). Walking outwards from k = 1, each interval between
 * consecutive candidates is tested once; the first candidate beyond which the loop is unstable
 * bounds the interval. A candidate at which the loop only touches the boundary and stays stable
 * on both sides (a tangent phase crossover) does not bound it.
 */

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
		const mag = Math.hypot(p.re, p.im);
		if (mag > 0 && Number.isFinite(mag)) out.push({ k: 1 / mag, f: p.f });
	}
	return out.sort((a, b) => a.k - b.k);
}

export function gainInterval(
	candidates: GainCandidate[],
	stableAt: (k: number) => boolean
): GainInterval {
	const above = candidates.filter((c) => c.k > 1);
	const below = candidates.filter((c) => c.k < 1).reverse();
	let high: GainCandidate | null = null;
	for (let i = 0; i < above.length && !high; i++) {
		const next = above[i + 1];
		const probe = next ? Math.sqrt(above[i].k * next.k) : 2 * above[i].k;
		if (next && next.k <= above[i].k * (1 + 1e-12)) continue;
		if (!stableAt(probe)) high = above[i];
	}
	let low: GainCandidate | null = null;
	for (let i = 0; i < below.length && !low; i++) {
		const next = below[i + 1];
		const probe = next ? Math.sqrt(below[i].k * next.k) : 0.5 * below[i].k;
		if (next && next.k >= below[i].k * (1 - 1e-12)) continue;
		if (!stableAt(probe)) low = below[i];
	}
	return { high, low };
}
