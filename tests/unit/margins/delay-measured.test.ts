import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { computeMargins, parseModelText } from '../../../src/lib/margins/index';
import { arcCrossings, oddMultiplesBetween } from '../../../src/lib/margins/nyquist';
import { caseOf, conv, dB, loop, near, nearRel, poly, rad, tf, TWO_PI } from './helpers';

/** A measured block sampled from a known continuous response, phase wrapped to ±180° as instruments give it. */
function measuredFrom(L: (w: number) => [number, number], hz: number[], openLoopUnstablePoles = 0) {
	return {
		type: 'measured',
		hz,
		magnitudeDb: hz.map((f) => dB(Math.hypot(...L(TWO_PI * f)))),
		phaseDeg: hz.map((f) => (Math.atan2(L(TWO_PI * f)[1], L(TWO_PI * f)[0]) * 180) / Math.PI),
		openLoopUnstablePoles
	};
}
const logHz = (lo: number, hi: number, n: number) =>
	Array.from({ length: n }, (_, i) => lo * (hi / lo) ** (i / (n - 1)));

describe('the Nyquist bookkeeping', () => {
	it('counts odd multiples of 180° strictly inside an interval, and indentation arcs', () => {
		expect(oddMultiplesBetween(-Math.PI / 2, Math.PI / 2)).toBe(0);
		expect(oddMultiplesBetween(-1.01 * Math.PI, 1.01 * Math.PI)).toBe(2);
		expect(oddMultiplesBetween(0.5, 3 * Math.PI + 0.1)).toBe(2);
		// one integrator (sweep 180° through 0): no crossing of the negative axis
		expect(arcCrossings(Math.PI / 2 + 0.01, -Math.PI / 2 - 0.01, 1)).toBe(0);
		// a double integrator whose phase sits just below −180°: the arc passes ±180°
		expect(arcCrossings(Math.PI + 0.01, -Math.PI - 0.01, 2)).toBe(2);
		expect(arcCrossings(Math.PI - 0.01, -Math.PI + 0.01, 2)).toBe(0);
	});
});

describe('continuous loops with a transport delay', () => {
	it('the delay subtracts ωτ from the phase at every gain crossover [CHECK-VALUES property]', () => {
		const base = caseOf(loop([25], [1, 10, 10, 10]));
		const tau = 0.1;
		const d = caseOf(loop([25], [1, 10, 10, 10], { delaySeconds: tau }));
		nearRel(d.phaseMarginHz, base.phaseMarginHz!, 1e-12);
		near(
			d.phaseMarginDeg,
			base.phaseMarginDeg! - rad(base.phaseMarginHz)! * tau * (180 / Math.PI),
			1e-9
		);
		nearRel(d.delayMarginSeconds, base.delayMarginSeconds! - tau, 1e-9);
		expect(d.closedLoopPoles).toBeUndefined();
	});

	it('an open-loop unstable plant with delay stays stable by the Nyquist count (P = 1)', () => {
		const plant = poly([4], conv([1, -1], [0.0004, 0.04, 1]));
		const pi = { type: 'pid', kp: 1.25, ki: 1.25 / 1.5 };
		const c = caseOf({ delaySeconds: 0.002, blocks: [plant, pi] });
		const r = caseOf({ blocks: [plant, pi] });
		expect(c.stable).toBe(true);
		expect(c.lowerGainMarginDb).not.toBeNull();
		// a small delay barely moves the lower margin (set at 0.845 rad/s) and lowers the upper one
		near(c.lowerGainMarginDb, r.lowerGainMarginDb!, 0.05);
		expect(c.upperGainMarginDb!).toBeLessThan(r.upperGainMarginDb!);
		// enough delay destabilises it
		expect(c.delayMarginSeconds!).toBeLessThan(0.25);
		expect(caseOf({ delaySeconds: 0.25, blocks: [plant, pi] }).stable).toBe(false);
	});

	it('a resonant (PR) controller: poles on the imaginary axis indented by the count', () => {
		const pr = poly([1, 0], [1, 0, 100]);
		const plant = poly([50], [1, 10]);
		const r = caseOf({ blocks: [pr, plant] });
		const d = caseOf({ delaySeconds: 1e-4, blocks: [pr, plant] });
		expect(r.stable).toBe(true);
		expect(d.stable).toBe(true);
		near(
			d.phaseMarginDeg,
			r.phaseMarginDeg! - rad(r.phaseMarginHz)! * 1e-4 * (180 / Math.PI),
			1e-9
		);
	});

	it('a delayed biproper loop with |L(∞)| ≥ 1 is unstable (it encircles −1 without end)', () => {
		const c = caseOf(loop([2, 1], [1, 1], { delaySeconds: 0.01 }));
		expect(c.stable).toBe(false);
		// |L| falls towards 0.5 while the delay winds the phase: the first phase crossover, with |L|
		// just above 0.5, bounds the gain a little below 1/|L(∞)| = 2
		const ok = caseOf(loop([0.5, 1], [1, 1], { delaySeconds: 0.01 }));
		expect(ok.stable).toBe(true);
		expect(ok.upperGainMarginDb!).toBeLessThan(dB(2));
		expect(ok.upperGainMarginDb!).toBeGreaterThan(dB(2) - 0.01);
		expect(ok.upperGainMarginHz).toBe(ok.phaseCrossovers[0].hz);
	});
});

describe('measured responses', () => {
	it('measured points of a known loop give its margins (evaluated on the measured band only)', () => {
		const [num, den] = [[25], [1, 10, 10, 10]];
		const m = caseOf({ blocks: [measuredFrom(tf(num, den), logHz(0.001, 100, 500))] });
		const r = caseOf(loop(num, den));
		expect(m.measuredOnly).toBe(true);
		expect(m.closedLoopPoles).toBeUndefined();
		expect(m.stable).toBe(true);
		near(m.phaseMarginDeg, r.phaseMarginDeg!, 0.01);
		nearRel(m.phaseMarginHz, r.phaseMarginHz!, 1e-4);
		near(m.upperGainMarginDb, r.upperGainMarginDb!, 0.01);
		nearRel(m.upperGainMarginHz, r.upperGainMarginHz!, 1e-4);
		nearRel(m.modulusMargin, r.modulusMargin!, 1e-3);
	});

	it('a crossover exactly on a measured point (0 dB, −180° there) is found once', () => {
		const hz = [1, 2, 3, 4, 5];
		const c = caseOf({
			blocks: [
				{
					type: 'measured',
					hz,
					magnitudeDb: [20, 6, 0, -6, -12],
					phaseDeg: [-120, -150, -170, -180, -200],
					openLoopUnstablePoles: 0
				}
			]
		});
		expect(c.gainCrossovers).toEqual([{ hz: 3, phaseMarginDeg: 10 }]);
		expect(c.phaseCrossovers).toHaveLength(1);
		expect(c.phaseCrossovers[0].hz).toBeCloseTo(4, 12);
		near(c.phaseCrossovers[0].gainMarginDb, 6, 1e-9);
	});

	it('openLoopUnstablePoles enters the count: a measured open-loop unstable loop is stable only when declared', () => {
		const L = tf([5, 5 / 1.5], conv(conv([1, 0], [1, -1]), [0.0004, 0.04, 1]));
		const hz = logHz(0.001, 1000, 600);
		expect(caseOf({ blocks: [measuredFrom(L, hz, 1)] }).stable).toBe(true);
		const undeclared = caseOf({ blocks: [measuredFrom(L, hz, 0)] });
		expect(undeclared.stable).toBe(false);
		expect(undeclared.diskMargin).toBeNull();
	});

	it('the CSV fixture (a measured integrating loop with delay) matches its closed forms', () => {
		const path = new URL('../../../fixtures/models/charger-measured-response.csv', import.meta.url);
		const parsed = parseModelText(readFileSync(path, 'utf8'), 'charger-measured-response.csv');
		expect(parsed.ok).toBe(true);
		if (!parsed.ok) return;
		const c = computeMargins(parsed.model).cases[0];
		// L = 2π·200/s · 1/(1 + s/(2π·2000)) · e^{−s·50 µs} (see the fixture): crossover near 199 Hz
		expect(c.measuredOnly).toBe(true);
		expect(c.stable).toBe(true);
		const f = c.phaseMarginHz!;
		const expected = 90 - (Math.atan(f / 2000) * 180) / Math.PI - 360 * f * 50e-6;
		near(c.phaseMarginDeg, expected, 0.02);
		near(f, 200 / Math.sqrt(1 + (f / 2000) ** 2), 0.2);
	});

	it('a measured block combined with an extra delay loses ωτ of phase', () => {
		const block = measuredFrom(tf([25], [1, 10, 10, 10]), logHz(0.001, 100, 400));
		const a = caseOf({ blocks: [block] });
		const b = caseOf({ delaySeconds: 0.05, blocks: [block] });
		nearRel(b.phaseMarginHz, a.phaseMarginHz!, 1e-9);
		near(
			b.phaseMarginDeg,
			a.phaseMarginDeg! - rad(a.phaseMarginHz)! * 0.05 * (180 / Math.PI),
			1e-6
		);
	});
});
