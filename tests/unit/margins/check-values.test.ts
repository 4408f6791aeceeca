/**
 * Outside reference values (shared CHECK-VALUES.md), each check naming its source beside it.
 * Frequencies as the sources print them (rad/s); the engine reports Hz.
 */
import { describe, expect, it } from 'vitest';
import { caseOf, conv, dB, loop, near, nearRel, poly, rad, ratioOf } from './helpers';

const zoh = (num: number[], den: number[], T: number) => ({
	sampleTimeSeconds: T,
	blocks: [poly(num, den, { domain: 's', discretize: 'zoh' })]
});
const withPi = (num: number[], den: number[], kp: number, ki: number) => ({
	blocks: [poly(num, den), { type: 'pid', kp, ki }]
});

describe('rational continuous loops', () => {
	it('row 1: 24/((s+1)(s+2)(s+3))', () => {
		const c = caseOf(loop([24], [1, 6, 11, 6]));
		// Routh–Hurwitz: Ku = 60 at ω = √11 [form]
		near(c.upperGainMarginDb, dB(60 / 24), 1e-9, 'upper GM');
		nearRel(rad(c.upperGainMarginHz), Math.sqrt(11), 1e-9, 'phase crossover');
		expect(c.lowerGainMarginDb).toBeNull();
		// Octave control package 3.4, margin.m built-in tests [src]: PM 35.43° at 2.064 rad/s
		near(c.phaseMarginDeg, 35.43, 0.005, 'PM');
		near(rad(c.phaseMarginHz), 2.064, 0.0005, 'PM frequency');
	});

	it('row 3: 25/(s³+10s²+10s+10), with delay and disk margins', () => {
		const c = caseOf(loop([25], [1, 10, 10, 10]));
		// Routh–Hurwitz Ku = a₂a₁ − a₀ = 90 at √10 [form]
		near(c.upperGainMarginDb, dB(90 / 25), 1e-9, 'upper GM');
		nearRel(rad(c.upperGainMarginHz), Math.sqrt(10), 1e-9, 'phase crossover');
		// python-control margin_test.py [src]
		near(c.phaseMarginDeg, 29.11, 0.005, 'PM');
		near(rad(c.phaseMarginHz), 1.7844, 0.00005, 'PM frequency');
		near(c.delayMarginSeconds, 0.2847, 0.00005, 'delay margin');
		expect(c.delayMarginSamples).toBeNull();
		// Seiler, Packard & Gahinet, IEEE CSM 40(5) 2020, via python-control [src]: α 0.46, ±4.05 dB, ±25.8°
		near(c.diskMargin?.alpha, 0.46, 0.005, 'disk α');
		near(c.diskMargin?.gainDb, 4.05, 0.005, 'disk gain');
		near(c.diskMargin?.phaseDeg, 25.8, 0.05, 'disk phase');
	});

	it('row 4: 1/(s³+2s²+3s+4): no gain crossover', () => {
		const c = caseOf(loop([1], [1, 2, 3, 4]));
		near(c.upperGainMarginDb, dB(2), 1e-9); // Routh–Hurwitz: Ku = 2·3 − 4 = 2 at √3 [form]
		nearRel(rad(c.upperGainMarginHz), Math.sqrt(3), 1e-9);
		expect(c.gainCrossovers).toEqual([]); // python-control margin_test.py [src]
		expect([c.phaseMarginDeg, c.phaseMarginHz, c.delayMarginSeconds]).toEqual([null, null, null]);
		near(c.modulusMargin, 0.417, 0.00005, 'modulus margin'); // python-control margin_test.py [src]
		near(rad(c.peakSensitivityHz), 1.662, 0.0005, 'its frequency');
		nearRel(c.peakSensitivity, 1 / c.modulusMargin!, 1e-12);
	});

	it('row 5: 0.01(10−s)/((s+2)(s+1)) — python-control margin_test.py [src]', () => {
		const c = caseOf(loop([-0.01, 0.1], [1, 3, 2]));
		near(ratioOf(c.upperGainMarginDb), 300, 0.015);
		near(rad(c.upperGainMarginHz), 5.6569, 0.00005);
		expect(c.gainCrossovers).toEqual([]);
		near(c.modulusMargin, 0.9917, 0.00005);
	});

	it('row 6: three gain crossovers; the reported PM is the smallest |PMᵢ| — python-control margin_test.py [src]', () => {
		const den = conv(conv([100, 1], [1, 0.22, 1]), [0.01, 0.008, 1]);
		const c = caseOf(loop([35, 3.5, 8.75], den));
		expect(c.stable).toBe(true);
		expect(c.gainCrossovers.map((g) => +rad(g.hz)!.toFixed(3))).toEqual([0.085, 0.937, 1.092]);
		// the source asserts with atol 1.5e-2 (134.7326° computed independently here as well)
		[97.59, -157.78, 134.74].forEach((pm, i) =>
			near(c.gainCrossovers[i].phaseMarginDeg, pm, 0.015, `PM ${i}`)
		);
		near(c.phaseMarginDeg, 97.59, 0.005);
		near(ratioOf(c.upperGainMarginDb), 2.2716, 0.00005);
		near(rad(c.upperGainMarginHz), 10.005, 0.0005);
		near(c.modulusMargin, 0.5591, 0.00005);
	});

	it('row 7: (s+0.1)/(s²(s+1)): no phase crossover — python-control, Bavafi-Toosi 2015 [src]', () => {
		const c = caseOf(loop([1, 0.1], [1, 1, 0, 0]));
		expect(c.stable).toBe(true);
		expect(c.phaseCrossovers).toEqual([]);
		expect(c.upperGainMarginDb).toBeNull();
		near(c.phaseMarginDeg, 44.46, 0.005);
		near(rad(c.phaseMarginHz), 0.7907, 0.00005);
	});

	it('row 8: (s+0.1)²/(s³(s+1)), conditionally stable: lower GM only', () => {
		const c = caseOf(loop([1, 0.2, 0.01], [1, 1, 0, 0, 0]));
		expect(c.stable).toBe(true);
		// exact: 2·atan(10ω) − atan(ω) = 90° at ω² = 0.0125, where |L| = 16 [form]
		near(c.lowerGainMarginDb, dB(1 / 16), 1e-9, 'lower GM');
		nearRel(rad(c.lowerGainMarginHz), Math.sqrt(0.0125), 1e-9);
		expect(c.upperGainMarginDb).toBeNull();
		near(c.phaseMarginDeg, 37.17, 0.005); // python-control margin_test.py [src]
	});

	it('row 9: 2s/(s+1): PM −120° yet the closed loop is stable — python-control margin_test.py [src]', () => {
		const c = caseOf(loop([2, 0], [1, 1]));
		near(c.phaseMarginDeg, -120, 1e-9);
		near(rad(c.phaseMarginHz), 1 / Math.sqrt(3), 1e-12);
		expect(c.stable).toBe(true);
		expect(c.unstablePoles).toBe(0);
		expect(c.closedLoopPoles).toHaveLength(1);
		near(c.closedLoopPoles![0][0], -1 / 3, 1e-12, 'closed-loop pole');
		// delay margin by definition: (PM mod 360° in rad)/ω = (240° in rad)·√3 [definition]
		near(c.delayMarginSeconds, ((240 * Math.PI) / 180) * Math.sqrt(3), 1e-9);
	});

	it('row 11: open-loop unstable, stable closed loop — Skogestad & Postlethwaite 2005, Example 2.5 [mem]', () => {
		const c = caseOf(withPi([4], conv([1, -1], [0.0004, 0.04, 1]), 1.25, 1.25 / 1.5));
		expect(c.stable).toBe(true);
		nearRel(ratioOf(c.lowerGainMarginDb), 0.206, 0.02);
		nearRel(rad(c.lowerGainMarginHz), 0.845, 0.02);
		nearRel(ratioOf(c.upperGainMarginDb), 18.7, 0.02);
		nearRel(rad(c.upperGainMarginHz), 48.3, 0.02);
		near(c.phaseMarginDeg, 59.5, 1);
	});

	it('row 12: inverse response with PI — Skogestad & Postlethwaite 2005, Examples 2.3/2.4 [mem]', () => {
		const c = caseOf(withPi([-6, 3], conv([10, 1], [5, 1]), 1.14, 1.14 / 12.7));
		expect(c.stable).toBe(true);
		nearRel(ratioOf(c.upperGainMarginDb), 1.63, 0.02);
		near(c.phaseMarginDeg, 19.4, 1);
		nearRel(c.peakSensitivity, 3.9, 0.02);
	});

	it('rows 13 and 14: K/(s(s+a)(s+b)) and K/(s+a)³ — Routh–Hurwitz [form]', () => {
		for (const [a, b, f] of [
			[0.5, 1, 0.3],
			[1, 40, 0.9],
			[300, 2000, 0.5]
		]) {
			const ku = a * b * (a + b);
			const c = caseOf(loop([f * ku], conv([1, 0], conv([1, a], [1, b]))));
			near(c.upperGainMarginDb, dB(1 / f), 1e-6, `a=${a} b=${b}`);
			nearRel(rad(c.upperGainMarginHz), Math.sqrt(a * b), 1e-6);
		}
		for (const [a, f] of [
			[0.1, 0.2],
			[4000, 0.95]
		]) {
			const c = caseOf(loop([f * 8 * a ** 3], [1, 3 * a, 3 * a * a, a ** 3]));
			near(c.upperGainMarginDb, dB(1 / f), 1e-6, `a=${a}`);
			nearRel(rad(c.upperGainMarginHz), a * Math.sqrt(3), 1e-6);
		}
		const unstable = caseOf(loop([1.2 * 30], conv([1, 0], conv([1, 2], [1, 3]))));
		expect(unstable.stable).toBe(false);
		expect([
			unstable.upperGainMarginDb,
			unstable.lowerGainMarginDb,
			unstable.delayMarginSeconds,
			unstable.diskMargin
		]).toEqual([null, null, null, null]);
		expect(unstable.modulusMargin).toBeGreaterThan(0); // kept for unstable loops
	});

	it('rows 17 and 18: modulus and symmetric optimum [form]', () => {
		const x = Math.sqrt((Math.SQRT2 - 1) / 2); // 4x²(1 + x²) = 1, x = ωT
		for (const T of [1e-4, 1]) {
			const c = caseOf(loop([1], [2 * T * T, 2 * T, 0]));
			nearRel(rad(c.phaseMarginHz), x / T, 1e-9);
			near(c.phaseMarginDeg, 90 - (Math.atan(x) * 180) / Math.PI, 1e-9);
		}
		for (const a of [2, 3, 4]) {
			const T = 0.01;
			const c = caseOf(loop([a * a * T, 1], [a ** 3 * T ** 3, a ** 3 * T * T, 0, 0]));
			nearRel(rad(c.phaseMarginHz), 1 / (a * T), 1e-9);
			near(c.phaseMarginDeg, ((Math.atan(a) - Math.atan(1 / a)) * 180) / Math.PI, 1e-9);
		}
	});

	it('row 19: balanced disk margin formulas — Seiler, Packard & Gahinet 2020 [form]', () => {
		// constant L = 3: S = 1/4, max|S − 1/2| = 1/4, α = 4 ≥ 2 → no disk gain margin
		const c = caseOf(loop([3], [1]));
		near(c.diskMargin?.alpha, 4, 1e-12);
		expect(c.diskMargin?.gainDb).toBeNull();
		near(c.diskMargin?.phaseDeg, (2 * Math.atan(2) * 180) / Math.PI, 1e-12);
		// any reported α: gain 20·log10((2+α)/(2−α)), phase 2·atan(α/2); α = 0.5 gives 4.437 dB, 28.07°
		const r3 = caseOf(loop([25], [1, 10, 10, 10])).diskMargin!;
		near(r3.gainDb, dB((2 + r3.alpha) / (2 - r3.alpha)), 1e-12);
		near(r3.phaseDeg, (2 * Math.atan(r3.alpha / 2) * 180) / Math.PI, 1e-12);
		near(dB(2.5 / 1.5), 4.437, 0.0005);
	});
});

describe('sampled loops (zero-order hold)', () => {
	it('row 2: 24/((s+1)(s+2)(s+3)), T = 0.3 s — Octave control margin.m tests [src]', () => {
		const c = caseOf(zoh([24], [1, 6, 11, 6], 0.3));
		near(ratioOf(c.upperGainMarginDb), 1.41, 0.005, 'GM');
		near(rad(c.upperGainMarginHz), 2.48, 0.005, 'GM frequency');
		near(c.phaseMarginDeg, 18.6, 0.005, 'PM');
		near(rad(c.phaseMarginHz), 2.04, 0.005, 'PM frequency');
	});

	it('row 10: 2/(s(s+1)(s+2)), T = 0.01 s — python-control margin_test.py [src]', () => {
		const c = caseOf(zoh([2], [1, 3, 2, 0], 0.01));
		near(ratioOf(c.upperGainMarginDb), 2.9558, 0.00005);
		near(rad(c.upperGainMarginHz), 1.4037, 0.00005);
		near(c.phaseMarginDeg, 32.398, 0.0005);
		near(rad(c.phaseMarginHz), 0.7494, 0.00005);
		nearRel(c.delayMarginSamples, c.delayMarginSeconds! / 0.01, 1e-12);
	});
});

describe('transport delay', () => {
	it('row 15: K·e^{−sT}/s — closed forms [form]', () => {
		for (const [K, T] of [
			[1, 0.5],
			[0.2, 6],
			[50, 0.002]
		]) {
			const c = caseOf(loop([K], [1, 0], { delaySeconds: T }));
			expect(c.stable).toBe(true);
			expect(c.gainCrossovers).toHaveLength(1);
			nearRel(rad(c.phaseMarginHz), K, 1e-9);
			near(c.phaseMarginDeg, 90 - (K * T * 180) / Math.PI, 1e-9);
			nearRel(rad(c.phaseCrossovers[0].hz), Math.PI / (2 * T), 1e-9);
			near(c.upperGainMarginDb, dB(Math.PI / (2 * K * T)), 1e-8);
			nearRel(c.delayMarginSeconds, Math.PI / (2 * K) - T, 1e-9);
			expect(c.closedLoopPoles).toBeUndefined();
		}
		const printed = caseOf(loop([1], [1, 0], { delaySeconds: 0.5 }));
		near(printed.phaseMarginDeg, 61.35, 0.005); // table: PM 61.35°, GM 3.1416
		near(ratioOf(printed.upperGainMarginDb), 3.1416, 0.00005);
	});

	it('row 16: K·e^{−sL}/(τs+1), τ = L = 1: ultimate frequency 2.029, Ku 2.262 [form]', () => {
		let [lo, hi] = [0, Math.PI];
		for (let i = 0; i < 200; i++) {
			const m = (lo + hi) / 2;
			[lo, hi] = Math.atan(m) + m < Math.PI ? [m, hi] : [lo, m];
		}
		const wu = (lo + hi) / 2;
		const ku = Math.hypot(1, wu);
		near(wu, 2.029, 0.0005);
		near(ku, 2.262, 0.0005);
		const c = caseOf(loop([0.5 * ku], [1, 1], { delaySeconds: 1 }));
		expect(c.stable).toBe(true);
		nearRel(rad(c.upperGainMarginHz), wu, 1e-9);
		near(c.upperGainMarginDb, dB(2), 1e-8);
		expect(caseOf(loop([1.1 * ku], [1, 1], { delaySeconds: 1 })).stable).toBe(false);
	});
});
