/**
 * Randomised checks on seeded loops: the two stability routes agree, and the textbook bounds
 * between the margins hold for every stable loop.
 */
import { describe, expect, it } from 'vitest';
import { computeMargins } from '../../../src/lib/margins/index';
import { toCaseResult } from '../../../src/lib/margins/figures';
import { buildCases } from '../../../src/lib/margins/loop';
import { rationalAnalysis } from '../../../src/lib/margins/rational';
import { responseAnalysis } from '../../../src/lib/margins/response-path';
import { conv, model, near, tf } from './helpers';

function rng(seed: number) {
	let s = seed;
	return () => (s = (s * 16807) % 2147483647) / 2147483647;
}

/** A random proper loop from real poles and lightly to well damped pairs; some open-loop unstable. */
function randomLoop(rnd: () => number) {
	const section = (unstable: number): [number[], number] => {
		if (rnd() < 0.4) {
			const w = 10 ** (rnd() * 3 - 1.5);
			const z = rnd() < 0.3 ? 0.01 + rnd() * 0.05 : 0.1 + 0.8 * rnd();
			const re = (rnd() < unstable ? 1 : -1) * z * w;
			return [[1, -2 * re, w * w], 2];
		}
		return [[1, (rnd() < unstable ? 1 : -1) * -(10 ** (rnd() * 3 - 1.5))], 1];
	};
	let den = [1];
	let order = 0;
	const poles = 1 + Math.floor(rnd() * 5);
	while (order < poles) {
		const [p, n] = section(0.15);
		den = conv(den, p);
		order += n;
	}
	if (rnd() < 0.25) den = conv(den, [1, 0]);
	let num = [10 ** (rnd() * 3 - 1.5)];
	const zeros = Math.floor(rnd() * Math.min(3, den.length - 1));
	for (let i = 0; i < zeros; i++)
		num = conv(num, [1, -(rnd() < 0.2 ? 1 : -1) * 10 ** (rnd() * 3 - 1.5)]);
	if (num.length >= den.length) num = [num[0]];
	return { num, den };
}

describe('the Nyquist count agrees with the closed-loop poles', () => {
	it('on 150 seeded rational loops, continuous and sampled', () => {
		const rnd = rng(20_240_601);
		let compared = 0;
		let unstable = 0;
		for (let i = 0; i < 150; i++) {
			const { num, den } = randomLoop(rnd);
			const sampled = i % 3 === 0;
			const block = {
				type: 'polynomial',
				numerator: num,
				denominator: den,
				...(sampled ? { domain: 's', discretize: i % 2 ? 'zoh' : 'tustin' } : {})
			};
			const m = model({
				...(sampled ? { sampleTimeSeconds: 0.02 + 0.05 * rnd() } : {}),
				blocks: [block]
			});
			const loop = buildCases(m)[0];
			const roots = toCaseResult(rationalAnalysis(loop));
			// close to the boundary the two routes may legitimately round to different sides
			const margin = Math.min(
				...roots.closedLoopPoles!.map(([re, im]) =>
					sampled ? Math.abs(Math.hypot(re, im) - 1) : Math.abs(re) / (Math.hypot(re, im) || 1)
				)
			);
			if (margin < 1e-6) continue;
			const nyq = toCaseResult(responseAnalysis(loop));
			compared++;
			if (!roots.stable) unstable++;
			expect(nyq.stable, `loop ${i}: ${JSON.stringify(block)}`).toBe(roots.stable);
			expect(nyq.unstablePoles, `loop ${i}`).toBe(roots.unstablePoles);
			// the Nyquist route lists phase crossovers down to −40 dB (a delayed loop's would never end)
			if (roots.stable && (roots.upperGainMarginDb ?? Infinity) < 35)
				near(nyq.upperGainMarginDb, roots.upperGainMarginDb!, 1e-6, `upper GM ${i}`);
			if (roots.stable && roots.lowerGainMarginDb !== null)
				near(nyq.lowerGainMarginDb, roots.lowerGainMarginDb, 1e-6, `lower GM ${i}`);
		}
		expect(compared).toBeGreaterThan(120);
		expect(unstable).toBeGreaterThan(20); // the test exercises both verdicts
	});
});

describe('bounds that hold for every stable loop — Skogestad & Postlethwaite 2005, §2.4.3 [mem]', () => {
	it('GM ≥ Ms/(Ms − 1) at every phase crossover, |PM| ≥ 2·asin(1/(2Ms)) at every gain crossover', () => {
		const rnd = rng(7_7_2025);
		let checked = 0;
		for (let i = 0; i < 150; i++) {
			const { num, den } = randomLoop(rnd);
			const c = computeMargins(
				model({ blocks: [{ type: 'polynomial', numerator: num, denominator: den }] })
			).cases[0];
			if (!c.stable || c.modulusMargin === null) continue;
			checked++;
			const mm = c.modulusMargin;
			for (const p of c.phaseCrossovers) {
				const mag = 10 ** (-p.gainMarginDb / 20);
				// |1 + L| = |1 − |L|| at a phase crossover, and it is at least the modulus margin
				expect(Math.abs(1 - mag)).toBeGreaterThanOrEqual(mm * (1 - 1e-9));
			}
			if (c.upperGainMarginDb !== null)
				expect(10 ** (c.upperGainMarginDb / 20)).toBeGreaterThanOrEqual(
					(1 / (1 - mm)) * (1 - 1e-9)
				);
			for (const g of c.gainCrossovers)
				expect(Math.abs(g.phaseMarginDeg)).toBeGreaterThanOrEqual(
					((2 * Math.asin(mm / 2) * 180) / Math.PI) * (1 - 1e-9)
				);
			// the modulus margin is a global minimum: no dense-grid point goes below it
			const L = tf(num, den);
			let dense = Infinity;
			for (let w = 1e-4; w < 1e4; w *= 1.003)
				dense = Math.min(dense, Math.hypot(1 + L(w)[0], L(w)[1]));
			expect(dense).toBeGreaterThanOrEqual(mm * (1 - 1e-9));
		}
		expect(checked).toBeGreaterThan(40);
	});

	it('a stable loop given exactly its delay margin as extra delay has a gain crossover with PM 0 (mod 360°) [CHECK-VALUES property]', () => {
		const rnd = rng(31_415);
		let checked = 0;
		for (let i = 0; i < 60 && checked < 15; i++) {
			const { num, den } = randomLoop(rnd);
			const c = computeMargins(
				model({ blocks: [{ type: 'polynomial', numerator: num, denominator: den }] })
			).cases[0];
			if (!c.stable || c.delayMarginSeconds === null || c.delayMarginSeconds > 1e3) continue;
			checked++;
			const d = computeMargins(
				model({
					delaySeconds: c.delayMarginSeconds,
					blocks: [{ type: 'polynomial', numerator: num, denominator: den }]
				})
			).cases[0];
			const closest = Math.min(...d.gainCrossovers.map((g) => Math.abs(g.phaseMarginDeg)));
			expect(closest).toBeLessThan(1e-6);
		}
		expect(checked).toBeGreaterThan(5);
	});
});
