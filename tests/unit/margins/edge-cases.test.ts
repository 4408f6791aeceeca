import { describe, expect, it } from 'vitest';
import { computeMargins } from '../../../src/lib/margins/index';
import {
	caseOf,
	conv,
	dB,
	denseCrossings,
	loop,
	model,
	near,
	nearRel,
	poly,
	rad,
	tf,
	TWO_PI
} from './helpers';

describe('continuous edge cases', () => {
	it('pure integrator 1/s: PM 90° at 1 rad/s, no phase crossover, no gain limit [form]', () => {
		const c = caseOf(loop([1], [1, 0]));
		expect(c.stable).toBe(true);
		near(c.phaseMarginDeg, 90, 1e-12);
		nearRel(rad(c.phaseMarginHz), 1, 1e-12);
		expect(c.phaseCrossovers).toEqual([]);
		expect([c.upperGainMarginDb, c.lowerGainMarginDb]).toEqual([null, null]);
		near(c.delayMarginSeconds, Math.PI / 2, 1e-12); // 90° at 1 rad/s
		near(c.modulusMargin, 1, 1e-12); // |1 + 1/(jω)| ≥ 1, approached as ω → ∞
	});

	it('no crossover at all: 0.5/(s+1)', () => {
		const c = caseOf(loop([0.5], [1, 1]));
		expect(c.stable).toBe(true);
		expect([c.gainCrossovers, c.phaseCrossovers]).toEqual([[], []]);
		expect([
			c.phaseMarginDeg,
			c.upperGainMarginDb,
			c.lowerGainMarginDb,
			c.delayMarginSeconds
		]).toEqual([null, null, null, null]);
		near(c.modulusMargin, 1, 1e-9); // |1 + L| → 1 as ω → ∞, larger elsewhere
	});

	it('DC phase crossover: a loop with L(0) finite and negative', () => {
		// L = −0.5/(s+1): real and negative at ω = 0, GM 6.02 dB there, stable for k < 2 [form]
		const c = caseOf(loop([-0.5], [1, 1]));
		expect(c.stable).toBe(true);
		expect(c.phaseCrossovers[0]).toEqual({ hz: 0, gainMarginDb: dB(2) });
		near(c.upperGainMarginDb, dB(2), 1e-12);
		expect(c.upperGainMarginHz).toBe(0);
	});

	it('poles on the imaginary axis: 1/(s²+1) closes onto ±j√2 (unstable); k(s+1)/(s²+1) is stable', () => {
		const c = caseOf(loop([1], [1, 0, 1]));
		expect(c.stable).toBe(false);
		expect(c.unstablePoles).toBe(2);
		c.closedLoopPoles!.forEach(([re, im]) => {
			expect(Math.abs(re)).toBeLessThan(1e-12);
			near(Math.abs(im), Math.SQRT2, 1e-12);
		});
		// s² + ks + 1 + k: stable for every k > 0, so neither gain margin is bounded
		const ok = caseOf(loop([0.5, 0.5], [1, 0, 1]));
		expect(ok.stable).toBe(true);
		expect([ok.upperGainMarginDb, ok.lowerGainMarginDb]).toEqual([null, null]);
		// a phase "crossover" exactly on the open-loop pole at 1 rad/s is the pole itself, not a crossover
		expect(ok.phaseCrossovers.every((p) => Math.abs(rad(p.hz)! - 1) > 1e-6)).toBe(true);
	});

	it('resonance with damping 0.001: 0.01/(s(0.01s² + 0.0002s + 1)) — Routh: Ku = 2 at 10 rad/s [form]', () => {
		const c = caseOf(loop([0.01], [0.01, 0.0002, 1, 0]));
		expect(c.stable).toBe(true);
		near(c.upperGainMarginDb, dB(2), 1e-8);
		nearRel(rad(c.upperGainMarginHz), 10, 1e-10);
		// doubling the gain lands on the boundary: k = 1.999 stable, 2.001 unstable
		expect(caseOf(loop([0.01], [0.01, 0.0002, 1, 0]), { gainScale: 1.999 }).stable).toBe(true);
		expect(caseOf(loop([0.01], [0.01, 0.0002, 1, 0]), { gainScale: 2.001 }).stable).toBe(false);
	});

	it('damping 0.001 resonance crossing 0 dB: every crossover the brute-force scan finds is found', () => {
		// collocated zero/pole pair (ζ = 0.001) on an integrator: the peak pokes above 0 dB twice
		const num = conv([0.1], [1 / 81, 0.002 / 9, 1]);
		const den = conv([1, 0], [1 / 100, 0.002 / 10, 1]);
		const c = caseOf(loop(num, den));
		const dense = denseCrossings(tf(num, den), 1e-3, 1e3, 20000);
		expect(c.gainCrossovers.length).toBe(dense.gain.length);
		expect(c.gainCrossovers.length).toBe(3);
		c.gainCrossovers.forEach((g, i) =>
			nearRel(rad(g.hz), dense.gain[i], 1e-8, `gain crossover ${i}`)
		);
		expect(c.stable).toBe(true);
	});

	it('a crossover exactly on a grid point: 1/s crosses at 1 rad/s, the centre of its own grid', () => {
		const c = caseOf(loop([1], [1, 0]));
		expect(c.gainCrossovers).toHaveLength(1);
		const k = caseOf(loop([2], [1, 0]), { gainScale: 0.5 });
		expect(k.gainCrossovers).toEqual(c.gainCrossovers);
	});

	it('a tangent gain crossover (|L| touching 1) is not lost', () => {
		// |L(jω)|² = 4ω²/(1 + ω²)² ≤ 1 with equality at ω = 1: L = 2s/(s+1)²
		const c = caseOf(loop([2, 0], [1, 2, 1]));
		expect(c.gainCrossovers).toHaveLength(1);
		nearRel(rad(c.gainCrossovers[0].hz), 1, 1e-6);
		near(c.gainCrossovers[0].phaseMarginDeg, 180, 1e-6);
	});

	it('a phase curve only touching −180° bounds the gain interval at the edge gain [form]', () => {
		// ∠L = 2·atan(ω/a) − 90° − 2·atan ω for L = K(s + a)²/(s(s + 1)²) has its minimum at ω = √a,
		// and that minimum is exactly −180° for atan √a = 67.5°: a = (1 + √2)², ω = 1 + √2. K puts
		// the touching point at k = 2: there 1 + 2L(jω) = 0, a closed-loop pole on the axis, so the
		// loop is not stable at k = 2 although it is on both sides of it (definition: every k in
		// (k_low, k_high) stable). Rounding of a makes the curve cross twice, touch or miss by
		// ~1e-12 relative; each must give the bound at 6.0206 dB, none "unbounded".
		const w = 1 + Math.SQRT2;
		const a0 = w * w;
		const K = (w * (1 + w * w)) / (2 * (a0 * a0 + w * w));
		for (const a of [a0, a0 * (1 + 1e-12), a0 * (1 - 1e-12)]) {
			const c = caseOf(loop([K, 2 * K * a, K * a * a], [1, 2, 1, 0]));
			expect(c.stable).toBe(true);
			near(c.upperGainMarginDb, dB(2), 1e-4);
			nearRel(rad(c.upperGainMarginHz), w, 1e-5);
			expect(c.lowerGainMarginDb).toBeNull();
			// the loop is stable on both sides of the edge gain: it is the touching point that bounds
			expect(
				caseOf(
					loop(
						[K, 2 * K * a, K * a * a].map((x) => x * 1.999),
						[1, 2, 1, 0]
					)
				).stable
			).toBe(true);
			expect(
				caseOf(
					loop(
						[K, 2 * K * a, K * a * a].map((x) => x * 2.001),
						[1, 2, 1, 0]
					)
				).stable
			).toBe(true);
		}
	});

	it('characteristic polynomials of the xⁿ + c family: 1/(s⁴ + 16) closes onto s⁴ = −17', () => {
		const c = caseOf(loop([1], [1, 0, 0, 0, 16]));
		expect(c.unstablePoles).toBe(2);
		c.closedLoopPoles!.forEach(([re, im]) => nearRel(Math.hypot(re, im), 17 ** 0.25, 1e-12));
	});

	it('a biproper loop with negative high-frequency gain is bounded at ω → ∞', () => {
		// L = −(4.39s + 5.21)/(s + 0.386): the closed-loop pole passes through infinity at k = 1/4.39
		const c = caseOf(loop([-4.39, -5.21], [1, 0.386]));
		expect(c.stable).toBe(true);
		near(c.lowerGainMarginDb, dB(1 / 4.39), 1e-9);
		expect(c.lowerGainMarginHz).toBeNull(); // at infinite frequency
	});

	it('gainScale multiplies L: every GMᵢ moves by −20·log10(k) at the same frequency [CHECK-VALUES property]', () => {
		const base = caseOf(loop([24], [1, 6, 11, 6]));
		const scaled = caseOf(loop([24], [1, 6, 11, 6]), { gainScale: 1.7 });
		scaled.phaseCrossovers.forEach((p, i) => {
			nearRel(p.hz, base.phaseCrossovers[i].hz, 1e-10);
			near(p.gainMarginDb, base.phaseCrossovers[i].gainMarginDb - dB(1.7), 1e-9);
		});
		expect(() => computeMargins(model(loop([1], [1, 1])), { gainScale: 0 })).toThrow(RangeError);
	});
});

describe('sampled edge cases', () => {
	// ω_c = 1 rad/s and ω_s = 1000 rad/s: |L| = KT/(2 sin(θ/2)), ∠L = −90° − θ/2 [form]
	const T = TWO_PI / 1000;
	const integrator = { sampleTimeSeconds: T, blocks: [{ type: 'factored', poles: [1], gain: T }] };

	it('an integrator sampled 1000× faster than its crossover', () => {
		const c = caseOf(integrator);
		const theta = 2 * Math.asin(T / 2);
		expect(c.stable).toBe(true);
		expect(c.gainCrossovers).toHaveLength(1);
		nearRel(rad(c.phaseMarginHz), theta / T, 1e-12);
		near(c.phaseMarginDeg, 90 - (theta / 2) * (180 / Math.PI), 1e-10);
		nearRel(c.delayMarginSeconds, ((Math.PI / 2 - theta / 2) / theta) * T, 1e-10);
		nearRel(c.delayMarginSamples, c.delayMarginSeconds! / T, 1e-12);
	});

	it('a phase crossover at the Nyquist frequency: L(−1) = −KT/2', () => {
		const c = caseOf(integrator);
		expect(c.phaseCrossovers).toHaveLength(1);
		nearRel(c.phaseCrossovers[0].hz, 1 / (2 * T), 1e-12);
		near(c.upperGainMarginDb, dB(2 / T), 1e-9);
		nearRel(c.upperGainMarginHz, 1 / (2 * T), 1e-12);
	});

	it('a gain crossover exactly at the Nyquist frequency: 1.875(z + 0.2)/(z − 0.5), |L(−1)| = 1', () => {
		const c = caseOf({
			sampleTimeSeconds: 1e-3,
			blocks: [{ type: 'factored', zeros: [-0.2], poles: [0.5], gain: 1.875 }]
		});
		expect(c.gainCrossovers).toHaveLength(1);
		expect(c.gainCrossovers[0].hz).toBeCloseTo(500, 9);
		near(c.gainCrossovers[0].phaseMarginDeg, 180, 1e-9);
		expect(c.stable).toBe(true); // 2.875z − 0.125: pole at 0.0435
	});

	it('poles on the unit circle: k(z − 0.5)/(z² + 1) closes inside it; 1.5/(z − 0.5) onto z = −1', () => {
		const c = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [
				{
					type: 'factored',
					zeros: [0.5],
					poles: [
						[0, 1],
						[0, -1]
					],
					gain: 0.5
				}
			]
		});
		expect(c.stable).toBe(true);
		c.closedLoopPoles!.forEach(([re, im]) => nearRel(Math.hypot(re, im), Math.sqrt(0.75), 1e-12));
		const edge = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [{ type: 'factored', poles: [0.5], gain: 1.5 }]
		});
		expect(edge.stable).toBe(false);
		expect(edge.unstablePoles).toBe(1);
		near(edge.phaseMarginDeg, 0, 1e-9);
	});

	it('whole-sample delays z⁻ⁿ: 0.5·z⁻⁸ and 0.5·z⁻⁴⁰ close onto zⁿ = −0.5 (the xⁿ − c family)', () => {
		for (const n of [8, 40]) {
			const T = 1e-3;
			const c = caseOf({
				sampleTimeSeconds: T,
				delaySeconds: n * T,
				blocks: [{ type: 'factored', gain: 0.5 }]
			});
			expect(c.stable).toBe(true);
			c.closedLoopPoles!.forEach(([re, im]) => nearRel(Math.hypot(re, im), 0.5 ** (1 / n), 1e-10));
			// |L| = 0.5 everywhere; −nθ = −180° first at θ = π/n [form]
			near(c.upperGainMarginDb, dB(2), 1e-9);
			nearRel(c.phaseCrossovers[0].hz, 1 / (2 * n * T), 1e-9);
			expect(c.phaseCrossovers).toHaveLength(Math.ceil(n / 2));
		}
	});

	it('a long whole-sample delay beyond folding (100 samples) takes the Nyquist route and agrees', () => {
		const T = 1e-3;
		const c = caseOf({
			sampleTimeSeconds: T,
			delaySeconds: 0.1,
			blocks: [{ type: 'factored', poles: [1], gain: T }]
		});
		expect(c.stable).toBe(true);
		expect(c.closedLoopPoles).toBeUndefined();
		// L = T/(z − 1)·z⁻¹⁰⁰: ∠L = −90° − θ/2 − 100θ; first −180° at θ = (π/2)/100.5 [form]
		nearRel(c.phaseCrossovers[0].hz, Math.PI / 2 / 100.5 / T / TWO_PI, 1e-9);
		near(c.upperGainMarginDb, dB((2 * Math.sin(Math.PI / 4 / 100.5)) / T), 1e-8);
	});
});

describe('sampled loops: Tustin and the hold', () => {
	it('Tustin keeps the continuous response at the warped frequency (2/T)·tan(ωT/2) [form]', () => {
		const T = 0.05;
		const cont = caseOf(loop([24], [1, 6, 11, 6]));
		const c = caseOf({
			sampleTimeSeconds: T,
			blocks: [poly([24], [1, 6, 11, 6], { domain: 's', discretize: 'tustin' })]
		});
		const warp = (hz: number) => (Math.atan((rad(hz)! * T) / 2) * (2 / T)) / TWO_PI;
		near(c.phaseMarginDeg, cont.phaseMarginDeg!, 1e-9);
		nearRel(c.phaseMarginHz, warp(cont.phaseMarginHz!), 1e-9);
		near(c.upperGainMarginDb, cont.upperGainMarginDb!, 1e-9);
		nearRel(c.upperGainMarginHz, warp(cont.upperGainMarginHz!), 1e-9);
	});

	it('Tustin of 1/(s+1) equals the z-domain block (T/(2+T))(z+1)/(z − (2−T)/(2+T))', () => {
		const T = 0.1;
		const a = computeMargins(
			model({
				sampleTimeSeconds: T,
				blocks: [poly([3], [1, 1], { domain: 's', discretize: 'tustin' })]
			})
		).cases[0];
		const b = computeMargins(
			model({
				sampleTimeSeconds: T,
				blocks: [
					{ type: 'factored', zeros: [-1], poles: [(2 - T) / (2 + T)], gain: (3 * T) / (2 + T) }
				]
			})
		).cases[0];
		nearRel(a.phaseMarginHz, b.phaseMarginHz!, 1e-12);
		near(a.phaseMarginDeg, b.phaseMarginDeg!, 1e-9);
	});

	it('a hold sampled 1000× faster than crossover stays within a fraction of a degree of the continuous loop [CHECK-VALUES property]', () => {
		const cont = caseOf(loop([24], [1, 6, 11, 6]));
		const T = TWO_PI / (1000 * 2.064);
		const c = caseOf({
			sampleTimeSeconds: T,
			blocks: [poly([24], [1, 6, 11, 6], { domain: 's', discretize: 'zoh' })]
		});
		near(c.phaseMarginDeg, cont.phaseMarginDeg!, 0.3);
		near(c.upperGainMarginDb, cont.upperGainMarginDb!, 0.15); // the hold adds ωT/2 of lag: 0.08 dB here
		nearRel(c.phaseMarginHz, cont.phaseMarginHz!, 1e-3);
	});
});
