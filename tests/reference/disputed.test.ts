/**
 * Loops on which the engine and the double-precision reference once disagreed, each settled by a
 * third computation in 60-digit arithmetic (lib/precise.ts, decimal.js; cross-checked once with
 * 80-digit mpmath: partial fractions and expm of the realisation for the holds, polynomial roots
 * for the z-polynomial). The engine's figure must match the precise value; the reference's old
 * double-precision figure is quoted beside each, so a regression on either side shows.
 */
import { describe, expect, it } from 'vitest';
import { generateLoop, toLoopModel } from '../../scripts/lib/loop-generator';
import { caseOf, TWO_PI } from './lib/engine';
import { preciseUnstableZ, preciseZoh, preciseZPoly } from './lib/precise';

const abs = (l: [number, number]) => Math.hypot(l[0], l[1]);
const dB = (l: [number, number]) => 20 * Math.log10(abs(l));

describe('disputed seeds, settled in 60 digits', () => {
	it('z seed 200273: the lower margin of a double integrator written out in z-coefficients is real', () => {
		const loop = generateLoop(200273, { domain: 'z', order: 4 });
		const c = caseOf(toLoopModel(loop));
		const T = loop.sampleTimeSeconds!;
		const L = preciseZPoly(loop.num, loop.den, T);
		// rounding splits the double pole at z = 1 into 1 + 2.9e-13 ± 2.99e-7j: the file's L crosses
		// −180° at θ ≈ 1.05e-6, and the gain at which that pair enters the circle bounds the interval
		const pc = c.phaseCrossovers[0];
		const l = L(pc.hz * TWO_PI);
		expect(Math.abs(Math.atan2(l[1], -l[0]))).toBeLessThan(1e-9);
		expect(c.lowerGainMarginDb).toBeCloseTo(-dB(l), 6);
		const kl = 10 ** (c.lowerGainMarginDb! / 20);
		// exact root counts: the old harness (a Nyquist count from θ = π·1e-6) said 1 at kl·(1 + 1e-4)
		expect(preciseUnstableZ(loop.num, loop.den, kl * (1 + 1e-6))).toBe(0);
		expect(preciseUnstableZ(loop.num, loop.den, kl * (1 + 1e-4))).toBe(0);
		expect(preciseUnstableZ(loop.num, loop.den, kl * (1 - 1e-6))).toBe(2);
	});

	it('ZOH seed 300339: L(0) = −4.25e13 is finite, and the modulus margin is 0.8009, not 0.8216', () => {
		const loop = generateLoop(300339, { domain: 'zoh', order: 10 });
		const c = caseOf(toLoopModel(loop));
		const L = preciseZoh(loop);
		expect(c.phaseCrossovers[0].hz).toBe(0);
		expect(c.phaseCrossovers[0].gainMarginDb).toBeCloseTo(-dB(L(0)), 6);
		const at = L(c.peakSensitivityHz! * TWO_PI);
		expect(Math.abs(c.modulusMargin! / Math.hypot(1 + at[0], at[1]) - 1)).toBeLessThan(1e-9);
		const top = c.phaseCrossovers[c.phaseCrossovers.length - 1];
		expect(top.gainMarginDb).toBeCloseTo(-dB(L(top.hz * TWO_PI)), 6);
	});

	it('ZOH seed 702362: a close complex pair of zeros (0.04754 ± 2.2e-4j) is not split into two reals', () => {
		// the order-8 block's fast pole pair aliases to 0.0479 ± 5.5e-4j; the zeros beside it once
		// came out as two real ones, and every |L| 4e-4 too low (crossover 27.8829 Hz, 4e-4 off)
		const loop = generateLoop(702362);
		expect([loop.domain, loop.order, loop.representation]).toEqual(['zoh', 8, 'state-space']);
		const c = caseOf(toLoopModel(loop));
		// reference: direct evaluation of |L| at the frequency (60-digit partial fractions of the hold)
		const L = preciseZoh(loop);
		const excess = (hz: number) => abs(L(hz * TWO_PI)) - 1;
		expect(c.gainCrossovers).toHaveLength(1);
		const hz = c.gainCrossovers[0].hz;
		let [lo, hi] = [hz * 0.99, hz * 1.01];
		expect(excess(lo)).toBeGreaterThan(0);
		expect(excess(hi)).toBeLessThan(0);
		for (let i = 0; i < 50; i++) {
			const mid = 0.5 * (lo + hi);
			if (excess(mid) > 0) lo = mid;
			else hi = mid;
		}
		expect(Math.abs(hz / lo - 1)).toBeLessThan(1e-6);
		expect(Math.abs(excess(hz))).toBeLessThan(1e-9);
		for (const p of c.phaseCrossovers) expect(p.gainMarginDb).toBeCloseTo(-dB(L(p.hz * TWO_PI)), 6);
	});

	// continuous seeds held at 1000× their highest crossover (properties.test.ts): the hold changes them
	for (const [seed, order, T, expectHeld] of [
		[600081, 2, 0.004772484833495654, 'PM −30.80° at 0.19591 Hz, not the continuous −4.19°'],
		[600114, 5, 0.00008845469144194584, 'one gain crossover, not the continuous three'],
		[
			600302,
			3,
			0.0039047701068786037,
			'upper GM 29.976 dB at 0.2054 Hz, not the continuous 33.90 dB'
		]
	] as const)
		it(`ZOH at 1000×, seed ${seed}: ${expectHeld}`, () => {
			const held = {
				...generateLoop(seed, { domain: 'continuous', order }),
				domain: 'zoh',
				representation: 'factored',
				sampleTimeSeconds: T
			} as const;
			const c = caseOf(toLoopModel(held));
			const L = preciseZoh(held);
			for (const g of c.gainCrossovers) {
				const l = L(g.hz * TWO_PI);
				expect(abs(l)).toBeCloseTo(1, 9);
				const pm = 180 + (Math.atan2(l[1], l[0]) * 180) / Math.PI;
				expect(((g.phaseMarginDeg - pm + 540) % 360) - 180).toBeCloseTo(0, 6);
			}
			for (const p of c.phaseCrossovers) {
				const l = L(p.hz * TWO_PI);
				expect(Math.abs(Math.atan2(l[1], -l[0]))).toBeLessThan(1e-9);
				expect(p.gainMarginDb).toBeCloseTo(-dB(l), 6);
			}
			if (seed === 600081) expect(c.phaseMarginDeg).toBeCloseTo(-30.798, 2);
			if (seed === 600114) {
				expect(c.gainCrossovers).toHaveLength(1);
				// the held |L| stays above 1 where the continuous one dipped below it
				for (const hz of [9.0027, 10, 11.3052]) expect(abs(L(hz * TWO_PI))).toBeGreaterThan(1.005);
			}
			if (seed === 600302) expect(c.upperGainMarginDb).toBeCloseTo(29.9757, 3);
		});
});
