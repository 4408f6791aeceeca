/**
 * Rows 1–19 of shared/CHECK-VALUES.md, each check carrying the table's source and mark.
 * Tolerances follow the mark: [form] tight (1e-6 relative in frequency, 1e-6 dB/deg where the
 * value is exact); [src] the source's own assertion tolerance where it states one, otherwise half a
 * unit of the last digit it prints; [mem] loose (2 %, 1°) because the value was recalled.
 * The sources print rad/s; the engine reports Hz (× 2π below).
 */
import { describe, expect, it } from 'vitest';
import { conv } from '../../scripts/lib/loop-generator';
import { caseOf, rational, tfResponse } from './lib/engine';
import {
	FORM_REL,
	FORM_ABS,
	MEM_REL,
	MEM_DEG,
	dB,
	deg,
	near,
	nearRel,
	rad,
	gainRatio,
	zoh
} from './lib/tolerance';
import { grid, sensitivityFigures } from './lib/dense';

describe('row 1: 24/((s+1)(s+2)(s+3))', () => {
	const c = () => caseOf(rational([24], [1, 6, 11, 6]));
	// source: Routh–Hurwitz Ku = 60 [form]
	it('upper GM 2.5 (7.96 dB) at √11 — Routh–Hurwitz Ku = 60 [form]', () => {
		expect(c().stable).toBe(true);
		near(c().upperGainMarginDb, dB(60 / 24), FORM_ABS, 'upper GM dB');
		nearRel(rad(c().upperGainMarginHz), Math.sqrt(11), FORM_REL, 'phase crossover rad/s');
		expect(c().lowerGainMarginDb).toBeNull();
	});
	// source: Octave control package 3.4 (Debian `octave-control`), margin.m built-in tests [src]
	it('GM 2.5 at 3.3166; PM 35.43° at 2.064 — Octave control package 3.4 (Debian `octave-control`), margin.m built-in tests [src]', () => {
		// margin.m asserts with an absolute tolerance of 1e-2
		near(gainRatio(c().upperGainMarginDb), 2.5, 1e-2, 'GM ratio');
		near(rad(c().upperGainMarginHz), 3.3166, 1e-2, 'GM rad/s');
		near(c().phaseMarginDeg, 35.43, 1e-2, 'PM');
		near(rad(c().phaseMarginHz), 2.064, 1e-2, 'PM rad/s');
	});
});

describe('row 2: 24/((s+1)(s+2)(s+3)), zero-order hold, T = 0.3 s', () => {
	// source: Octave control margin.m tests [src]
	it('GM 1.41 at 2.48; PM 18.60° at 2.04 — Octave control margin.m tests [src]', () => {
		const c = caseOf(zoh([24], [1, 6, 11, 6], 0.3));
		near(gainRatio(c.upperGainMarginDb), 1.41, 1e-2, 'GM ratio'); // margin.m: atol 1e-2
		near(rad(c.upperGainMarginHz), 2.48, 1e-2, 'GM rad/s');
		near(c.phaseMarginDeg, 18.6, 1e-2, 'PM');
		near(rad(c.phaseMarginHz), 2.04, 1e-2, 'PM rad/s');
	});
});

describe('row 3: 25/(s³+10s²+10s+10)', () => {
	const c = () => caseOf(rational([25], [1, 10, 10, 10]));
	// source: Routh–Hurwitz Ku = a₂a₁ − a₀ = 90 [form]
	it('GM 3.6 at √10 — Routh–Hurwitz Ku = a₂a₁ − a₀ = 90 [form]', () => {
		near(c().upperGainMarginDb, dB(90 / 25), FORM_ABS, 'upper GM dB');
		nearRel(rad(c().upperGainMarginHz), Math.sqrt(10), FORM_REL, 'phase crossover rad/s');
	});
	// source: python-control test suite `control/tests/margin_test.py`, examples of Seiler, Packard & Gahinet, IEEE Control Systems Magazine 40(5), 2020 [src]
	it('PM 29.11° at 1.7844; delay margin 0.2847 s; disk α 0.46, ±4.05 dB, ±25.8° — python-control test suite `control/tests/margin_test.py`, examples of Seiler, Packard & Gahinet, IEEE Control Systems Magazine 40(5), 2020 [src]', () => {
		near(c().phaseMarginDeg, 29.11, 0.005, 'PM');
		near(rad(c().phaseMarginHz), 1.7844, 0.00005, 'PM rad/s');
		near(c().delayMarginSeconds, 0.2847, 0.00005, 'delay margin s');
		expect(c().delayMarginSamples).toBeNull(); // continuous loop: no samples
		near(c().diskMargin?.alpha, 0.46, 0.005, 'disk α');
		near(c().diskMargin?.gainDb, 4.05, 0.005, 'disk gain margin dB');
		near(c().diskMargin?.phaseDeg, 25.8, 0.05, 'disk phase margin');
	});
});

describe('row 4: 1/(s³+2s²+3s+4)', () => {
	const c = () => caseOf(rational([1], [1, 2, 3, 4]));
	// source: Routh–Hurwitz [form]
	it('GM 2 at √3 — Routh–Hurwitz [form]', () => {
		near(c().upperGainMarginDb, dB(2), FORM_ABS, 'upper GM dB');
		nearRel(rad(c().upperGainMarginHz), Math.sqrt(3), FORM_REL, 'phase crossover rad/s');
	});
	// source: python-control margin_test.py [src]
	it('no gain crossover (PM null); modulus margin 0.4170 at 1.662 — python-control margin_test.py [src]', () => {
		expect(c().gainCrossovers).toEqual([]);
		expect(c().phaseMarginDeg).toBeNull();
		expect(c().delayMarginSeconds).toBeNull();
		near(c().modulusMargin, 0.417, 0.00005, 'modulus margin');
		near(rad(c().peakSensitivityHz), 1.662, 0.0005, 'modulus margin rad/s');
	});
});

describe('row 5: 0.01(10−s)/((s+2)(s+1))', () => {
	// source: python-control margin_test.py [src]
	it('GM 300 at 5.6569; no gain crossover; modulus margin 0.9917 — python-control margin_test.py [src]', () => {
		const c = caseOf(rational([-0.01, 0.1], [1, 3, 2]));
		near(gainRatio(c.upperGainMarginDb), 300, 1.5e-2, 'GM ratio'); // the source's atol
		near(rad(c.upperGainMarginHz), 5.6569, 0.00005, 'GM rad/s');
		expect(c.gainCrossovers).toEqual([]);
		expect(c.phaseMarginDeg).toBeNull();
		near(c.modulusMargin, 0.9917, 0.00005, 'modulus margin');
	});
});

describe('row 6: 8.75(4s²+0.4s+1)/((100s+1)(s²+0.22s+1)(s²/100+0.008s+1))', () => {
	// source: python-control margin_test.py [src]
	it('crossovers 0.085, 0.937, 1.092 with PM 97.59°, −157.78°, 134.74°; PM 97.59°; GM 2.2716 at 10.005; modulus margin 0.5591 — python-control margin_test.py [src]', () => {
		const den = conv(conv([100, 1], [1, 0.22, 1]), [0.01, 0.008, 1]);
		const c = caseOf(rational([35, 3.5, 8.75], den));
		const tol = 1.5e-2; // the source's stability_margins atol
		expect(c.stable).toBe(true);
		expect(c.gainCrossovers.length).toBe(3);
		[0.085, 0.937, 1.092].forEach((w, i) =>
			near(rad(c.gainCrossovers[i]?.hz), w, tol, `crossover ${i} rad/s`)
		);
		[97.59, -157.78, 134.74].forEach((pm, i) =>
			near(c.gainCrossovers[i]?.phaseMarginDeg, pm, tol, `PM ${i}`)
		);
		near(c.phaseMarginDeg, 97.59, tol, 'reported PM');
		near(gainRatio(c.upperGainMarginDb), 2.2716, tol, 'GM ratio');
		near(rad(c.upperGainMarginHz), 10.005, tol, 'GM rad/s');
		near(c.modulusMargin, 0.5591, tol, 'modulus margin');
	});
});

describe('row 7: (s+0.1)/(s²(s+1))', () => {
	// source: python-control margin_test.py, case from Bavafi-Toosi, J. Control Syst. Eng. 3(1), 2015 [src]
	it('no phase crossover (upper GM null); PM 44.46° at 0.7907 — python-control margin_test.py, case from Bavafi-Toosi, J. Control Syst. Eng. 3(1), 2015 [src]', () => {
		const c = caseOf(rational([1, 0.1], [1, 1, 0, 0]));
		expect(c.stable).toBe(true);
		expect(c.phaseCrossovers).toEqual([]);
		expect(c.upperGainMarginDb).toBeNull();
		near(c.phaseMarginDeg, 44.46, 0.005, 'PM');
		near(rad(c.phaseMarginHz), 0.7907, 0.00005, 'PM rad/s');
	});
});

describe('row 8: (s+0.1)²/(s³(s+1)), conditionally stable', () => {
	const c = () => caseOf(rational([1, 0.2, 0.01], [1, 1, 0, 0, 0]));
	// source: the exact value by solving 2·atan(10ω) − atan(ω) = 90° [form]
	it('lower GM 1/16 (−24.08 dB) at √0.0125 — the exact value by solving 2·atan(10ω) − atan(ω) = 90° [form]', () => {
		expect(c().stable).toBe(true);
		near(c().lowerGainMarginDb, dB(1 / 16), FORM_ABS, 'lower GM dB');
		nearRel(rad(c().lowerGainMarginHz), Math.sqrt(0.0125), FORM_REL, 'lower GM rad/s');
		expect(c().upperGainMarginDb).toBeNull();
	});
	// source: same [src]
	it('lower GM ≈ 0.0626; PM 37.17° — same [src] (python-control margin_test.py, Bavafi-Toosi 2015)', () => {
		near(gainRatio(c().lowerGainMarginDb), 0.0626, 1.5e-3, 'lower GM ratio'); // the source's atol
		near(c().phaseMarginDeg, 37.17, 0.005, 'PM');
	});
});

describe('row 9: 2s/(s+1)', () => {
	// source: same [src] — negative PM is not the stability verdict
	it('PM −120° at 0.577 while the closed loop (pole −1/3) is stable — same [src] (negative PM is not the stability verdict)', () => {
		const c = caseOf(rational([2, 0], [1, 1]));
		near(c.phaseMarginDeg, -120, 0.5, 'PM');
		near(rad(c.phaseMarginHz), 0.577, 0.0005, 'PM rad/s');
		expect(c.stable).toBe(true);
		expect(c.unstablePoles).toBe(0);
		expect(c.closedLoopPoles?.length).toBe(1);
		near(c.closedLoopPoles?.[0][0], -1 / 3, 1e-9, 'closed-loop pole');
	});
});

describe('row 10: 2/(s(s+1)(s+2)), zero-order hold, T = 0.01 s', () => {
	// source: python-control margin_test.py [src]
	it('GM 2.9558 at 1.4037; PM 32.398° at 0.7494 — python-control margin_test.py [src]', () => {
		const c = caseOf(zoh([2], [1, 3, 2, 0], 0.01));
		near(gainRatio(c.upperGainMarginDb), 2.9558, 0.00005, 'GM ratio');
		near(rad(c.upperGainMarginHz), 1.4037, 0.00005, 'GM rad/s');
		near(c.phaseMarginDeg, 32.398, 0.0005, 'PM');
		near(rad(c.phaseMarginHz), 0.7494, 0.00005, 'PM rad/s');
		near(
			c.delayMarginSamples,
			(c.delayMarginSeconds ?? NaN) / 0.01,
			1e-9,
			'delay margin in samples'
		);
	});
});

const pidLoop = (num: number[], den: number[], kp: number, ki: number) => ({
	format: 'headroom-loop-model/1',
	blocks: [
		{ type: 'polynomial', numerator: num, denominator: den },
		{ type: 'pid', kp, ki }
	]
});

describe('row 11: 4/((s−1)(0.02s+1)²) · 1.25(1 + 1/(1.5s))', () => {
	// source: Skogestad & Postlethwaite, Multivariable Feedback Control, 2nd ed. 2005, Example 2.5 [mem]
	it('open-loop unstable, closed loop stable; lower GM 0.206 at 0.845; upper GM 18.7 at 48.3; PM 59.5° — Skogestad & Postlethwaite, Multivariable Feedback Control, 2nd ed. 2005, Example 2.5 [mem]', () => {
		const c = caseOf(pidLoop([4], conv([1, -1], [0.0004, 0.04, 1]), 1.25, 1.25 / 1.5));
		expect(c.stable).toBe(true);
		nearRel(gainRatio(c.lowerGainMarginDb), 0.206, MEM_REL, 'lower GM ratio');
		nearRel(rad(c.lowerGainMarginHz), 0.845, MEM_REL, 'lower GM rad/s');
		nearRel(gainRatio(c.upperGainMarginDb), 18.7, MEM_REL, 'upper GM ratio');
		nearRel(rad(c.upperGainMarginHz), 48.3, MEM_REL, 'upper GM rad/s');
		near(c.phaseMarginDeg, 59.5, MEM_DEG, 'PM');
	});
});

describe('row 12: 3(−2s+1)/((10s+1)(5s+1)) · 1.14(1 + 1/(12.7s))', () => {
	// source: Skogestad & Postlethwaite 2005, Examples 2.3/2.4 [mem]
	it('GM ≈ 1.63; PM ≈ 19.4°; Ms ≈ 3.9 — Skogestad & Postlethwaite 2005, Examples 2.3/2.4 [mem]', () => {
		const c = caseOf(pidLoop([-6, 3], conv([10, 1], [5, 1]), 1.14, 1.14 / 12.7));
		expect(c.stable).toBe(true);
		nearRel(gainRatio(c.upperGainMarginDb), 1.63, MEM_REL, 'GM ratio');
		near(c.phaseMarginDeg, 19.4, MEM_DEG, 'PM');
		nearRel(c.peakSensitivity, 3.9, MEM_REL, 'Ms');
	});
});

describe('row 13: K/(s(s+a)(s+b)) — Routh–Hurwitz [form]', () => {
	for (const [a, b] of [
		[0.5, 1],
		[2, 3],
		[1, 40],
		[10, 10],
		[300, 2000]
	])
		for (const f of [0.1, 0.5, 0.9]) {
			// source: Routh–Hurwitz [form]
			it(`a=${a}, b=${b}, K=${f}·Ku: phase crossover √(ab), Ku = ab(a+b)`, () => {
				const ku = a * b * (a + b);
				const c = caseOf(rational([f * ku], conv([1, 0], conv([1, a], [1, b]))));
				expect(c.stable).toBe(true);
				near(c.upperGainMarginDb, dB(1 / f), FORM_ABS, 'upper GM dB');
				nearRel(rad(c.upperGainMarginHz), Math.sqrt(a * b), FORM_REL, 'phase crossover rad/s');
			});
		}
	// source: Routh–Hurwitz [form]
	it('K = 1.2·Ku is unstable and has no gain margins', () => {
		const c = caseOf(rational([1.2 * 2 * 3 * 5], conv([1, 0], conv([1, 2], [1, 3]))));
		expect(c.stable).toBe(false);
		expect([c.upperGainMarginDb, c.lowerGainMarginDb, c.delayMarginSeconds, c.diskMargin]).toEqual([
			null,
			null,
			null,
			null
		]);
	});
});

describe('row 14: K/(s+a)³ [form]', () => {
	for (const a of [0.1, 1, 50, 4000])
		for (const f of [0.2, 0.5, 0.95]) {
			// source: [form]
			it(`a=${a}, K=${f}·Ku: phase crossover a√3; Ku = 8a³`, () => {
				const c = caseOf(rational([f * 8 * a ** 3], [1, 3 * a, 3 * a * a, a ** 3]));
				near(c.upperGainMarginDb, dB(1 / f), FORM_ABS, 'upper GM dB');
				nearRel(rad(c.upperGainMarginHz), a * Math.sqrt(3), FORM_REL, 'phase crossover rad/s');
			});
		}
});

describe('row 15: K·e^{−sT}/s [form]', () => {
	const cases: [number, number][] = [
		[1, 0.5],
		[0.2, 0.5],
		[0.2, 6],
		[5, 0.02],
		[5, 0.24],
		[50, 0.002]
	];
	for (const [K, T] of cases)
		// source: [form]
		it(`K=${K}, T=${T}: crossover K; PM = 90° − KT·180/π; phase crossover π/(2T); GM = π/(2KT); delay margin π/(2K) − T`, () => {
			const c = caseOf(rational([K], [1, 0], { delaySeconds: T }));
			expect(c.stable).toBe(true);
			expect(c.gainCrossovers.length).toBe(1);
			nearRel(rad(c.phaseMarginHz), K, FORM_REL, 'gain crossover rad/s');
			near(c.phaseMarginDeg, 90 - deg(K * T), FORM_ABS, 'PM');
			nearRel(
				rad(c.phaseCrossovers[0]?.hz),
				Math.PI / (2 * T),
				FORM_REL,
				'first phase crossover rad/s'
			);
			near(
				c.phaseCrossovers[0]?.gainMarginDb,
				dB(Math.PI / (2 * K * T)),
				FORM_ABS,
				'first phase crossover GM'
			);
			near(c.upperGainMarginDb, dB(Math.PI / (2 * K * T)), FORM_ABS, 'upper GM dB');
			nearRel(c.delayMarginSeconds, Math.PI / (2 * K) - T, FORM_REL, 'delay margin');
			if (K === 1 && T === 0.5) {
				near(c.phaseMarginDeg, 61.35, 0.005, 'printed PM 61.35°');
				near(gainRatio(c.upperGainMarginDb), 3.1416, 0.00005, 'printed GM 3.1416');
			}
		});
});

/** ω with atan(ωτ) + ωL = π (the left side increases from 0 to beyond π on (0, π/L]). */
function ultimate(tau: number, L: number): number {
	let [lo, hi] = [0, Math.PI / L];
	for (let i = 0; i < 200; i++) {
		const m = (lo + hi) / 2;
		if (Math.atan(m * tau) + m * L < Math.PI) lo = m;
		else hi = m;
	}
	return (lo + hi) / 2;
}

describe('row 16: K·e^{−sL}/(τs+1) [form]: atan(ωτ) + ωL = π, Ku = √(1+ω²τ²)', () => {
	for (const [tau, L] of [
		[1, 1],
		[1, 0.1],
		[0.2, 1],
		[5, 0.5],
		[0.001, 0.0002]
	])
		for (const f of [0.3, 0.8]) {
			// source: [form]: atan(ωτ) + ωL = π, Ku = √(1+ω²τ²)
			it(`τ=${tau}, L=${L}, K=${f}·Ku`, () => {
				const wu = ultimate(tau, L);
				const ku = Math.sqrt(1 + wu * wu * tau * tau);
				const c = caseOf(rational([f * ku], [tau, 1], { delaySeconds: L }));
				expect(c.stable).toBe(true);
				nearRel(rad(c.upperGainMarginHz), wu, FORM_REL, 'ultimate frequency');
				near(c.upperGainMarginDb, dB(1 / f), FORM_ABS, 'upper GM dB');
				if (tau === 1 && L === 1) {
					near(wu, 2.029, 0.0005, 'table: ultimate frequency 2.029');
					near(ku, 2.262, 0.0005, 'table: Ku 2.262');
				}
			});
		}
});

describe('row 17: 1/(2Ts(1+Ts)), modulus-optimum current loop [form]', () => {
	// |L| = 1 ⇔ 4x²(1 + x²) = 1 with x = ωT
	const x = Math.sqrt((Math.SQRT2 - 1) / 2);
	for (const T of [1e-4, 0.01, 1])
		// source: [form]
		it(`T=${T}: crossover 0.455/T; PM 65.5°`, () => {
			const c = caseOf(rational([1], [2 * T * T, 2 * T, 0]));
			nearRel(rad(c.phaseMarginHz), x / T, FORM_REL, 'crossover rad/s');
			near(c.phaseMarginDeg, 90 - deg(Math.atan(x)), FORM_ABS, 'PM');
			near(x, 0.455, 0.0005, 'table: 0.455');
			near(90 - deg(Math.atan(x)), 65.5, 0.05, 'table: 65.5°');
		});
});

describe('row 18: (1+a²Ts)/(a³T²s²(1+Ts)), symmetric optimum [form]', () => {
	const printed: Record<number, number> = { 2: 36.87, 3: 53.13, 4: 61.93 };
	for (const a of [2, 3, 4])
		for (const T of [1e-4, 0.01, 1])
			// source: [form]
			it(`a=${a}, T=${T}: crossover 1/(aT); PM = atan(a) − atan(1/a) (${printed[a]}°)`, () => {
				const c = caseOf(rational([a * a * T, 1], [a ** 3 * T ** 3, a ** 3 * T * T, 0, 0]));
				const pm = deg(Math.atan(a) - Math.atan(1 / a));
				nearRel(rad(c.phaseMarginHz), 1 / (a * T), FORM_REL, 'crossover rad/s');
				near(c.phaseMarginDeg, pm, FORM_ABS, 'PM');
				near(pm, printed[a], 0.005, 'table value');
			});
});

describe('row 19: balanced disk margin — Seiler, Packard & Gahinet 2020 [form]', () => {
	const diskGainDb = (a: number) => dB((2 + a) / (2 - a));
	const diskPhase = (a: number) => deg(2 * Math.atan(a / 2));
	// source: Seiler, Packard & Gahinet 2020 [form]
	it('α = 0.5 → disk gain margin 1.6667 (4.437 dB), disk phase margin 28.07°', () => {
		expect(diskGainDb(0.5)).toBeCloseTo(4.437, 3);
		near(10 ** (diskGainDb(0.5) / 20), 1.6667, 0.00005, 'ratio');
		near(diskPhase(0.5), 28.07, 0.005, 'phase');
		// k/(s+1)³ tuned by dense evaluation until α = 0.5 (α falls as k grows towards Ku = 8)
		const alphaOf = (k: number) =>
			sensitivityFigures(tfResponse([k], [1, 3, 3, 1]), grid(1e-3, 1e3, 2000)).alpha;
		let [lo, hi] = [0.5, 7.9];
		for (let i = 0; i < 60; i++)
			[lo, hi] = alphaOf((lo + hi) / 2) > 0.5 ? [(lo + hi) / 2, hi] : [lo, (lo + hi) / 2];
		const k = (lo + hi) / 2;
		const d = caseOf(rational([k], [1, 3, 3, 1])).diskMargin;
		nearRel(d?.alpha, alphaOf(k), 1e-6, 'α against dense evaluation');
		near(d?.gainDb, 4.437, 0.0005, 'disk gain margin dB');
		near(d?.phaseDeg, 28.07, 0.005, 'disk phase margin');
		near(d?.gainDb, diskGainDb(d!.alpha), 1e-9, 'gain formula at the reported α');
		near(d?.phaseDeg, diskPhase(d!.alpha), 1e-9, 'phase formula at the reported α');
	});
	// source: Seiler, Packard & Gahinet 2020 [form]
	it('row 3 loop: reported α matches dense evaluation and the formulas', () => {
		const L = tfResponse([25], [1, 10, 10, 10]);
		const d = caseOf(rational([25], [1, 10, 10, 10])).diskMargin;
		nearRel(d?.alpha, sensitivityFigures(L, grid(1e-3, 1e3, 2000)).alpha, 1e-6, 'α');
		near(d?.gainDb, diskGainDb(d!.alpha), 1e-9, 'gain formula');
		near(d?.phaseDeg, diskPhase(d!.alpha), 1e-9, 'phase formula');
	});
	// source: Seiler, Packard & Gahinet 2020 [form]
	it('constant L = 3: S = 1/4, α = 2(1+3)/|1−3| = 4 ≥ 2 → disk gain margin null, phase 2·atan(2)', () => {
		const d = caseOf(rational([3], [1])).diskMargin;
		nearRel(d?.alpha, 4, 1e-9, 'α');
		expect(d?.gainDb).toBeNull();
		near(d?.phaseDeg, diskPhase(4), 1e-9, 'phase');
	});
	// source: Seiler, Packard & Gahinet 2020 [form]
	it('an unstable loop (10/(s+1)³, Ku = 8) has no disk margin', () => {
		expect(caseOf(rational([10], [1, 3, 3, 1])).diskMargin).toBeNull();
	});
});
