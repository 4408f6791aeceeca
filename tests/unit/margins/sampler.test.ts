import { describe, expect, it } from 'vitest';
import { computeMargins, sampleResponse, summarizeModel } from '../../../src/lib/margins/index';
import { dB, model, near, nearRel, poly, tf, TWO_PI } from './helpers';

const speedLoop = () =>
	model({
		blocks: [
			poly([400], [0.002, 1, 0]),
			{ type: 'pid', kp: 0.3, ki: 6, kd: 0.0005, derivativeFilterSeconds: 0.0002 }
		]
	});

describe('sampleResponse', () => {
	it('a few hundred points per case, ascending, each L(jω) as computed independently', () => {
		const m = model({ blocks: [poly([25], [1, 10, 10, 10])] });
		const [c] = sampleResponse(m);
		expect(c.name).toBe('nominal');
		expect(c.measuredOnly).toBe(false);
		expect(c.nyquistHz).toBeUndefined();
		expect(c.points.length).toBeGreaterThanOrEqual(250);
		expect(c.points.length).toBeLessThan(600);
		const L = tf([25], [1, 10, 10, 10]);
		for (let i = 0; i < c.points.length; i++) {
			const p = c.points[i];
			if (i > 0) expect(p.hz).toBeGreaterThan(c.points[i - 1].hz);
			const [re, im] = L(TWO_PI * p.hz);
			near(p.re, re, 1e-12 * Math.max(1, Math.hypot(re, im)));
			near(p.im, im, 1e-12 * Math.max(1, Math.hypot(re, im)));
			near(p.magnitudeDb, dB(Math.hypot(re, im)), 1e-9);
		}
	});

	it('spans about two decades beyond the outermost roots and includes every crossover exactly', () => {
		const m = speedLoop();
		const [c] = sampleResponse(m);
		const r = computeMargins(m).cases[0];
		// roots from 3.2 Hz (the PID's zeros, ki/kp = 20 rad/s) to 800 Hz (its filter pole)
		expect(c.points[0].hz).toBeLessThan(0.05);
		expect(c.points[c.points.length - 1].hz).toBeGreaterThan(50_000);
		for (const g of r.gainCrossovers) expect(c.points.some((p) => p.hz === g.hz)).toBe(true);
	});

	it("the phase is unwrapped: continuous, starting at the integrators' −90°·m", () => {
		const [c] = sampleResponse(model({ blocks: [poly([1], [1, 1, 0, 0])] })); // 1/(s²(s+1))
		near(c.points[0].phaseDeg, -180, 0.5);
		near(c.points[c.points.length - 1].phaseDeg, -180 - (Math.atan(100) * 180) / Math.PI, 1e-6); // two decades past the pole
		for (let i = 1; i < c.points.length; i++)
			expect(Math.abs(c.points[i].phaseDeg - c.points[i - 1].phaseDeg)).toBeLessThan(30);
		// a delay keeps winding the phase down instead of wrapping it
		const [d] = sampleResponse(model({ delaySeconds: 0.5, blocks: [poly([1], [1, 0])] }));
		const last = d.points[d.points.length - 1];
		near(last.phaseDeg, -90 - TWO_PI * last.hz * 0.5 * (180 / Math.PI), 1e-6);
	});

	it('is denser at a lightly damped resonance', () => {
		// ζ = 0.001 at 10 rad/s: the half-power band is 0.02 rad/s wide
		const [c] = sampleResponse(model({ blocks: [poly([0.01], [0.01, 0.0002, 1, 0])] }));
		const near10 = c.points.filter((p) => Math.abs(TWO_PI * p.hz - 10) < 0.05);
		expect(near10.length).toBeGreaterThanOrEqual(5);
		const peak = Math.max(...near10.map((p) => p.magnitudeDb));
		near(peak, dB(0.5), 0.05); // |L(j10)| = 0.5 exactly
	});

	it('sampled loops stop at the Nyquist frequency and say where it is; gainScale moves |L| only', () => {
		const m = model({
			sampleTimeSeconds: 1e-3,
			blocks: [{ type: 'factored', poles: [1], gain: 0.00628 }]
		});
		const [c] = sampleResponse(m);
		expect(c.nyquistHz).toBe(500);
		expect(c.points[c.points.length - 1].hz).toBeCloseTo(500, 9);
		const [k] = sampleResponse(m, { gainScale: 2 });
		// the grids differ only by the (moved) crossover points
		const byHz = new Map(c.points.map((p) => [p.hz, p]));
		const common = k.points.filter((p) => byHz.has(p.hz));
		expect(common.length).toBeGreaterThan(0.9 * c.points.length);
		for (const p of common) {
			near(p.magnitudeDb, byHz.get(p.hz)!.magnitudeDb + dB(2), 1e-9);
			near(p.phaseDeg, byHz.get(p.hz)!.phaseDeg, 1e-9);
		}
	});

	it('measured loops: the measured band only, flagged', () => {
		const hz = Array.from({ length: 50 }, (_, i) => 10 * 1.1 ** i);
		const m = model({
			blocks: [
				{
					type: 'measured',
					hz,
					magnitudeDb: hz.map((f) => -20 * Math.log10(f / 100)),
					phaseDeg: hz.map(() => -90),
					openLoopUnstablePoles: 0
				}
			]
		});
		const [c] = sampleResponse(m, { points: 100 });
		expect(c.measuredOnly).toBe(true);
		nearRel(c.points[0].hz, hz[0], 1e-12);
		nearRel(c.points[c.points.length - 1].hz, hz[hz.length - 1], 1e-12);
	});

	it('one response per case, in order', () => {
		const m = model({
			blocks: [poly([1], [1, 1])],
			cases: [{ name: 'a' }, { name: 'b', gain: 3 }]
		});
		expect(sampleResponse(m).map((c) => c.name)).toEqual(['a', 'b']);
	});
});

describe('summarizeModel', () => {
	it('describes the model for a diff between revisions', () => {
		const s = summarizeModel(
			model({
				sampleTimeSeconds: 1e-4,
				delaySeconds: 2e-4,
				blocks: [
					poly([1], [0.002, 0.5], { domain: 's', discretize: 'zoh' }),
					{ type: 'pid', kp: 3, ki: 750, domain: 's', discretize: 'tustin' }
				],
				cases: [{ name: 'cold' }, { name: 'hot', gain: 0.8 }]
			})
		);
		expect(s).toEqual({
			sampled: true,
			sampleTimeSeconds: 1e-4,
			delaySeconds: 2e-4,
			blocks: [
				'polynomial: numerator degree 0, denominator degree 1 (continuous, zoh)',
				'pid: kp 3, ki 750, kd 0, derivative filter 0 s (continuous, tustin)'
			],
			cases: ['cold', 'hot'],
			order: 4 // one hold pole, the PI's integrator, two samples of delay
		});
		const m = summarizeModel(
			model({
				blocks: [
					{
						type: 'measured',
						hz: [1, 2],
						magnitudeDb: [0, 0],
						phaseDeg: [0, 0],
						openLoopUnstablePoles: 1
					}
				]
			})
		);
		expect(m.order).toBeNull();
		expect(m.cases).toEqual(['nominal']);
		expect(m.blocks[0]).toBe('measured: 2 points, 1 Hz to 2 Hz, 1 open-loop unstable poles');
		expect(m.sampled).toBe(false);
	});
});
