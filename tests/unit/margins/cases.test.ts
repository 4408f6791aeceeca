import { describe, expect, it } from 'vitest';
import { computeMargins } from '../../../src/lib/margins/index';
import { worstCase } from '../../../src/lib/margins/worst-case';
import type { CaseResult } from '../../../src/lib/margins/types';
import { dB, model, near, poly } from './helpers';

const plant = poly([24], [1, 6, 11, 6]); // Ku = 60 (Routh–Hurwitz [form])

describe('operating cases', () => {
	it('absent cases give the single case "nominal"', () => {
		const r = computeMargins(model({ blocks: [plant] }));
		expect(r.format).toBe('headroom-margins/1');
		expect(r.engine).toMatch(/^\d+\.\d+\.\d+$/);
		expect(r.cases.map((c) => c.name)).toEqual(['nominal']);
		expect(r.worstCase.upperGainMarginDb).toBe(r.cases[0].upperGainMarginDb);
	});

	it('gain multiplies L, delaySeconds replaces the top-level delay, blocks replace the top-level blocks', () => {
		const r = computeMargins(
			model({
				delaySeconds: 0.1,
				blocks: [plant],
				cases: [
					{ name: 'as built' },
					{ name: 'hot', gain: 2 },
					{ name: 'no delay', delaySeconds: 0 },
					{ name: 'other plant', blocks: [poly([8], [1, 6, 11, 6])] }
				]
			})
		);
		const [asBuilt, hot, noDelay, other] = r.cases;
		near(
			hot.phaseCrossovers[0].gainMarginDb,
			asBuilt.phaseCrossovers[0].gainMarginDb - dB(2),
			1e-9
		);
		near(noDelay.upperGainMarginDb, dB(60 / 24), 1e-9);
		expect(noDelay.closedLoopPoles).toBeDefined(); // rational: no delay left
		expect(asBuilt.closedLoopPoles).toBeUndefined();
		// the replacing blocks keep the top-level delay
		expect(other.upperGainMarginDb!).toBeLessThan(dB(60 / 8));
	});

	it('worst case: smallest upper GM, lower GM closest to 0 dB, smallest |PM|, each naming its case', () => {
		const r = computeMargins(
			model({
				blocks: [plant],
				cases: [{ name: 'light' }, { name: 'heavy', gain: 1.8 }, { name: 'soft', gain: 0.5 }]
			})
		);
		const w = r.worstCase;
		expect(w.stable).toBe(true);
		expect(w.from.upperGainMarginDb).toBe('heavy');
		near(w.upperGainMarginDb, dB(60 / (24 * 1.8)), 1e-9);
		expect(w.upperGainMarginHz).toBe(r.cases[1].upperGainMarginHz);
		expect(w.from.phaseMarginDeg).toBe('heavy');
		expect(w.from.modulusMargin).toBe('heavy');
		expect(w.peakSensitivity).toBe(r.cases[1].peakSensitivity);
		expect(w.from.diskMargin).toBe('heavy');
	});

	it('null means no limit: the worst case is the worst figure any case has', () => {
		const r = computeMargins(
			model({
				blocks: [poly([1, 0.2, 0.01], [1, 1, 0, 0, 0])], // conditionally stable: lower GM −24.08 dB
				cases: [
					{ name: 'a' },
					{ name: 'b', gain: 2 },
					{ name: 'c', blocks: [poly([24], [1, 6, 11, 6])] }
				]
			})
		);
		// 'c' has no lower limit (null); a's is −24.08 dB, b's (twice the gain) −30.10 dB: a's is closest to 0 dB
		expect(r.cases[2].lowerGainMarginDb).toBeNull();
		near(r.cases[1].lowerGainMarginDb, dB(1 / 32), 1e-9);
		expect(r.worstCase.from.lowerGainMarginDb).toBe('a');
		near(r.worstCase.lowerGainMarginDb, dB(1 / 16), 1e-9);
		// only 'c' has an upper limit
		expect(r.worstCase.from.upperGainMarginDb).toBe('c');
	});

	it('an unstable case makes the worst case unstable, with no gain, delay or disk margin', () => {
		const r = computeMargins(
			model({ blocks: [plant], cases: [{ name: 'ok' }, { name: 'too hot', gain: 3 }] })
		);
		const w = r.worstCase;
		expect(w.stable).toBe(false);
		expect(w.unstablePoles).toBe(2);
		expect(w.from.stable).toBe('too hot');
		expect(w.from.unstablePoles).toBe('too hot');
		expect([w.upperGainMarginDb, w.lowerGainMarginDb, w.delayMarginSeconds, w.diskMargin]).toEqual([
			null,
			null,
			null,
			null
		]);
		expect(w.from.upperGainMarginDb).toBe('too hot');
		// the phase and modulus margins still come from the worst case that has them
		expect(w.phaseMarginDeg).not.toBeNull();
		expect(w.modulusMargin).toBe(Math.min(...r.cases.map((c) => c.modulusMargin!)));
	});

	it('smallest |PM| keeps its sign', () => {
		const base = { stable: true, unstablePoles: 0, gainCrossovers: [], phaseCrossovers: [] };
		const figures = (name: string, pm: number) =>
			({
				...base,
				name,
				upperGainMarginDb: null,
				upperGainMarginHz: null,
				lowerGainMarginDb: null,
				lowerGainMarginHz: null,
				phaseMarginDeg: pm,
				phaseMarginHz: 1,
				delayMarginSeconds: null,
				delayMarginSamples: null,
				modulusMargin: 1,
				peakSensitivity: 1,
				peakSensitivityHz: 1,
				diskMargin: null
			}) as CaseResult;
		const w = worstCase([figures('x', 40), figures('y', -25), figures('z', 30)]);
		expect(w.phaseMarginDeg).toBe(-25);
		expect(w.from.phaseMarginDeg).toBe('y');
	});
});
