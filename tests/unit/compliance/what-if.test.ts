import { describe, expect, it } from 'vitest';
import {
	describeRange,
	meetsRange,
	whatIfAt,
	type WhatIfInput
} from '../../../src/lib/compliance/what-if';
import type { Targets } from '../../../src/lib/compliance/criteria';
import { model, poly } from '../margins/helpers';

const now = new Date('2026-12-01T00:00:00Z');
const dB = (x: number) => 20 * Math.log10(x);
const input = (
	m: ReturnType<typeof model>,
	targets: Targets,
	extra: Partial<WhatIfInput> = {}
): WhatIfInput => ({
	model: m,
	targets,
	now,
	...extra
});

describe('whatIfAt', () => {
	it('scales the loop: the gain crossover of k·10/s moves to ω = 10k', () => {
		const m = model({ blocks: [poly([10], [1, 0])] });
		const p = whatIfAt(input(m, { minPhaseMarginDeg: '45' }), 6);
		expect(p.gainScale).toBeCloseTo(10 ** (6 / 20), 12);
		expect(p.margins.cases[0].gainCrossovers[0].hz).toBeCloseTo(
			(10 * p.gainScale) / (2 * Math.PI),
			9
		);
		expect(p.judgement.verdict).toBe('compliant');
		expect(p.meets).toBe(true);
	});

	it('refuses a gain that is not a number', () => {
		const m = model({ blocks: [poly([10], [1, 0])] });
		expect(() => whatIfAt(input(m, {}), Number.NaN)).toThrow(/finite number of dB/);
	});
});

describe('meetsRange against closed forms', () => {
	it('k·K/s with a crossover band [a, b] Hz: meets for 2πa/K ≤ k ≤ 2πb/K', () => {
		// |kK/(jω)| = 1 at ω = kK, so the crossover is kK/(2π) Hz; PM stays 90°.
		const K = 10;
		const m = model({ blocks: [poly([K], [1, 0])] });
		const r = meetsRange(
			input(m, { crossoverMinHz: '1', crossoverMaxHz: '3', minPhaseMarginDeg: '45' })
		);
		expect(r.nominalMeets).toBe(true);
		expect(r.intervals).toHaveLength(1);
		expect(r.interval!.lowDb).toBeCloseTo(dB((2 * Math.PI * 1) / K), 2);
		expect(r.interval!.highDb).toBeCloseTo(dB((2 * Math.PI * 3) / K), 2);
		expect(describeRange(r)).toBe('Meets every target from −4.0 dB to +5.5 dB.');
	});

	it('first-order plus integrator K/(s(τs+1)): PM = 90° − atan(τω_c), so PM ≥ φ up to k = ω_m·√(1+τ²ω_m²)/K', () => {
		// Derivation: PM(k) = 180° + ∠L(jω_c) = 90° − atan(τω_c), with ω_c from kK = ω_c·√(1+τ²ω_c²).
		// PM ≥ φ ⇔ ω_c ≤ ω_m = tan(90° − φ)/τ; |L| falls monotonically, so ω_c rises with k, and the
		// largest gain is k_max = ω_m·√(1+τ²ω_m²)/K. With K = 10, τ = 0.1, φ = 45°: ω_m = 10, k_max = √2.
		const m = model({ blocks: [poly([10], [0.1, 1, 0])] });
		const r = meetsRange(input(m, { minPhaseMarginDeg: '45' }));
		expect(r.nominalMeets).toBe(true);
		expect(r.interval!.lowDb).toBeNull(); // PM only rises as the gain falls
		expect(r.interval!.highDb).toBeCloseTo(dB(Math.SQRT2), 2);
		// and the verdict either side of it
		expect(whatIfAt(input(m, { minPhaseMarginDeg: '45' }), dB(Math.SQRT2) - 0.05).meets).toBe(true);
		const past = whatIfAt(input(m, { minPhaseMarginDeg: '45' }), dB(Math.SQRT2) + 0.05);
		expect(past.judgement.verdict).toBe('noncompliant');
		expect(past.judgement.failing).toEqual(['phaseMargin']);
	});

	it('a deviation relaxing the phase margin to 30° widens the range to k_max = ω_m·√(1+τ²ω_m²)/K with ω_m = tan 60°/τ', () => {
		const m = model({ blocks: [poly([10], [0.1, 1, 0])] });
		const wm = Math.tan(Math.PI / 3) / 0.1;
		const kmax = (wm * Math.sqrt(1 + (0.1 * wm) ** 2)) / 10;
		const deviation = {
			id: 'dev-1',
			relaxed: { minPhaseMarginDeg: '30' },
			startsAt: new Date('2026-01-01T00:00:00Z'),
			expiresAt: new Date('2027-01-01T00:00:00Z')
		};
		const r = meetsRange(input(m, { minPhaseMarginDeg: '45' }, { deviations: [deviation] }));
		expect(r.interval!.highDb).toBeCloseTo(dB(kmax), 2);
		expect(
			whatIfAt(input(m, { minPhaseMarginDeg: '45' }, { deviations: [deviation] }), 6).judgement
				.verdict
		).toBe('covered');
		// an expired deviation does not count
		const expired = { ...deviation, expiresAt: new Date('2026-06-01T00:00:00Z') };
		expect(
			meetsRange(input(m, { minPhaseMarginDeg: '45' }, { deviations: [expired] })).interval!.highDb
		).toBeCloseTo(dB(Math.SQRT2), 2);
	});

	it('K/(s+1)³ with GM ≥ 6 dB: GM = 20·log10(8/(kK)), so it meets up to 20·log10(8/K) − 6 dB; short at nominal when K = 10', () => {
		// Phase −180° at ω = √3 where |1/(s+1)³| = 1/8: GM(k) = 20·log10(8/(kK)) and the loop is
		// unstable for kK ≥ 8. GM ≥ 6 ⇔ 20·log10 k ≤ 20·log10(8/K) − 6.
		const targets = { minUpperGainMarginDb: '6' };
		const fine = { toleranceDb: 0.001 };
		const ok = meetsRange(input(model({ blocks: [poly([2], [1, 3, 3, 1])] }), targets), fine);
		expect(ok.nominalMeets).toBe(true);
		expect(ok.interval!.lowDb).toBeNull();
		expect(ok.interval!.highDb).toBeCloseTo(dB(8 / 2) - 6, 2);

		const m = model({ blocks: [poly([10], [1, 3, 3, 1])] });
		expect(whatIfAt(input(m, targets), 0).judgement.verdict).toBe('unstable');
		const short = meetsRange(input(m, targets), fine);
		expect(short.nominalMeets).toBe(false);
		expect(short.interval!.lowDb).toBeNull();
		expect(short.interval!.highDb).toBeCloseTo(dB(0.8) - 6, 2);
		expect(describeRange(short)).toBe(
			'Does not meet its targets at nominal gain; it would from below −40.0 dB to −7.9 dB.'
		);
	});

	it('no gain at all: two cases whose crossovers no single gain puts in the band', () => {
		const m = model({
			blocks: [poly([1], [1, 0])],
			cases: [{ name: 'slow' }, { name: 'fast', gain: 100 }]
		});
		// crossovers at k/(2π) and 100k/(2π) Hz: both in [1, 3] Hz would need 100k ≤ 6π and k ≥ 2π — never.
		const r = meetsRange(input(m, { crossoverMinHz: '1', crossoverMaxHz: '3' }));
		expect(r.nominalMeets).toBe(false);
		expect(r.interval).toBeNull();
		expect(r.intervals).toEqual([]);
		expect(describeRange(r)).toBe(
			'Does not meet its targets at any gain from −40.0 dB to +40.0 dB.'
		);
	});

	it('two disjoint ranges: K(s/20+1)²/(s(s+1)²) with PM ≥ 45° meets for low gains and again for high ones', () => {
		// Derivation (closed form, one crossover since |L| falls monotonically): the phase is
		// −90° − 2·g(ω) with g(ω) = atan ω − atan(ω/20), so PM = 90° − 2g(ω_c) and PM ≥ 45° ⇔
		// g(ω_c) ≤ 22.5°. g rises from 0 to its peak at ω = √20 (64.8°) and falls back to 0, so the
		// gain crossover must lie below ω_a or above ω_b, the two roots of g = 22.5°. A crossover at ω
		// takes the gain k = 1 / (K·|G(jω)|), |G(jω)| = (1 + ω²/400) / (ω(1 + ω²)). Past ω_b the loop
		// is conditionally stable (the phase dips below −180° where |L| > 1 and comes back).
		const K = 1000;
		const g = (w: number) => Math.atan(w) - Math.atan(w / 20);
		const root = (lo: number, hi: number) => {
			const rising = g(lo) < g(hi);
			for (let i = 0; i < 200; i++) {
				const mid = Math.sqrt(lo * hi);
				if (g(mid) < Math.PI / 8 === rising) lo = mid;
				else hi = mid;
			}
			return Math.sqrt(lo * hi);
		};
		const wa = root(1e-3, Math.sqrt(20));
		const wb = root(Math.sqrt(20), 1e4);
		const gainAt = (w: number) => dB(1 / ((K * (1 + (w * w) / 400)) / (w * (1 + w * w))));
		const m = model({ blocks: [poly([K / 400, K / 10, K], [1, 2, 1, 0])] });
		const r = meetsRange(input(m, { minPhaseMarginDeg: '45' }), {
			spanDb: 100,
			toleranceDb: 0.001
		});
		expect(r.nominalMeets).toBe(false);
		expect(r.intervals).toHaveLength(2);
		expect(r.intervals[0].lowDb).toBeNull();
		expect(r.intervals[0].highDb).toBeCloseTo(gainAt(wa), 2);
		expect(r.intervals[1].lowDb).toBeCloseTo(gainAt(wb), 2);
		expect(r.intervals[1].highDb).toBeNull();
		// the nearer range is the one offered; the other is still mentioned
		expect(r.interval).toEqual(r.intervals[1]);
		expect(describeRange(r)).toBe(
			`Does not meet its targets at nominal gain; it would from +${gainAt(wb).toFixed(1)} dB to beyond +100.0 dB (and 1 more range within −100.0 dB to +100.0 dB).`
		);
		// either side of each edge, and in the gap between the ranges
		const at = (db: number) => whatIfAt(input(m, { minPhaseMarginDeg: '45' }), db);
		expect(at(gainAt(wa) - 0.05).meets).toBe(true);
		expect(at(gainAt(wa) + 0.05).meets).toBe(false);
		expect(at(gainAt(wb) - 0.05).meets).toBe(false);
		const high = at(gainAt(wb) + 0.05);
		expect(high.meets).toBe(true);
		expect(high.margins.worstCase.lowerGainMarginDb).not.toBeNull(); // conditionally stable
		expect(at(0).judgement.verdict).toBe('unstable');
	});

	it('refuses a search without a span', () => {
		const m = model({ blocks: [poly([10], [1, 0])] });
		expect(() => meetsRange(input(m, {}), { spanDb: 0 })).toThrow(/must be > 0/);
	});
});
