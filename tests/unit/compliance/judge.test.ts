import { describe, expect, it } from 'vitest';
import { judge, type DeviationInput } from '../../../src/lib/compliance';
import type { CaseResult, MarginsResult, MarginFigures } from '../../../src/lib/margins/types';

const figures: MarginFigures = {
	stable: true,
	unstablePoles: 0,
	upperGainMarginDb: 9,
	upperGainMarginHz: 300,
	lowerGainMarginDb: null,
	lowerGainMarginHz: null,
	phaseMarginDeg: 52,
	phaseMarginHz: 100,
	delayMarginSeconds: 0.0014,
	delayMarginSamples: null,
	modulusMargin: 0.6,
	peakSensitivity: 1 / 0.6,
	peakSensitivityHz: 150,
	diskMargin: { alpha: 0.9, gainDb: 8.1, phaseDeg: 48 }
};

function result(over: Partial<MarginFigures> = {}, crossoversHz = [100]): MarginsResult {
	const f = { ...figures, ...over };
	const c: CaseResult = {
		name: 'nominal',
		...f,
		gainCrossovers: crossoversHz.map((hz) => ({ hz, phaseMarginDeg: f.phaseMarginDeg ?? 0 })),
		phaseCrossovers: []
	};
	const from = Object.fromEntries(Object.keys(f).map((k) => [k, 'nominal']));
	return { format: 'headroom-margins/1', engine: 'test', cases: [c], worstCase: { ...f, from } };
}

const now = new Date('2026-06-01T00:00:00Z');
const targets = { minUpperGainMarginDb: '6', minPhaseMarginDeg: '45', maxPeakSensitivity: '2' };

describe('verdicts', () => {
	it('is compliant when every targeted criterion holds', () => {
		const j = judge({ state: 'computed', result: result(), targets, now });
		expect(j.verdict).toBe('compliant');
		expect(j.criteria.map((c) => c.status)).toEqual(['pass', 'pass', 'pass']);
	});

	it('names each failing criterion with required, actual and exact shortfall', () => {
		const j = judge({ state: 'computed', result: result({ phaseMarginDeg: 38.5 }), targets, now });
		expect(j.verdict).toBe('noncompliant');
		expect(j.failing).toEqual(['phaseMargin']);
		const pm = j.criteria.find((c) => c.criterion === 'phaseMargin')!;
		expect(pm).toMatchObject({ required: '45', actual: 38.5, shortfall: '6.5', fromCase: 'nominal' });
	});

	it('compares thresholds exactly, not as binary floats', () => {
		// 2.0000000000000004 is the next double above 2: it exceeds an "at most 2" target.
		const over = judge({ state: 'computed', result: result({ peakSensitivity: 2.0000000000000004 }), targets, now });
		expect(over.failing).toEqual(['peakSensitivity']);
		// The double nearest 0.1 is slightly above 1/10, so it meets "at least 0.1".
		const at = judge({ state: 'computed', result: result({ modulusMargin: 0.1 }), targets: { minModulusMargin: '0.1' }, now });
		expect(at.verdict).toBe('compliant');
		const below = judge({ state: 'computed', result: result({ modulusMargin: 0.09999999999999999 }), targets: { minModulusMargin: '0.1' }, now });
		expect(below.verdict).toBe('noncompliant');
	});

	it('judges a negative phase margin of a stable loop by its size', () => {
		const j = judge({ state: 'computed', result: result({ phaseMarginDeg: -120 }), targets, now });
		expect(j.criteria.find((c) => c.criterion === 'phaseMargin')?.status).toBe('pass');
	});

	it('passes unbounded margins and judges the lower gain margin as a magnitude', () => {
		const t = { minUpperGainMarginDb: '6', minLowerGainMarginDb: '6' };
		expect(judge({ state: 'computed', result: result({ upperGainMarginDb: null }), targets: t, now }).verdict).toBe('compliant');
		const low = judge({ state: 'computed', result: result({ lowerGainMarginDb: -4 }), targets: t, now });
		expect(low.failing).toEqual(['lowerGainMargin']);
		expect(low.criteria.find((c) => c.criterion === 'lowerGainMargin')?.shortfall).toBe('2');
	});

	it('marks an unstable loop unstable whatever the deviations say', () => {
		const dev: DeviationInput = { id: 'd1', relaxed: { minPhaseMarginDeg: null }, startsAt: new Date(0), expiresAt: new Date('2030-01-01') };
		const j = judge({ state: 'computed', result: result({ stable: false, unstablePoles: 2, phaseMarginDeg: -10 }), targets, deviations: [dev], now });
		expect(j.verdict).toBe('unstable');
		expect(j.criteria.every((c) => c.status === 'fail')).toBe(true);
	});

	it('is covered when an active deviation relaxes every shortfall, and not once it expires', () => {
		const dev: DeviationInput = {
			id: 'dev-7',
			relaxed: { minPhaseMarginDeg: '35' },
			startsAt: new Date('2026-01-01'),
			expiresAt: new Date('2026-07-01')
		};
		const r = result({ phaseMarginDeg: 38.5 });
		const covered = judge({ state: 'computed', result: r, targets, deviations: [dev], now });
		expect(covered.verdict).toBe('covered');
		expect(covered.criteria.find((c) => c.criterion === 'phaseMargin')).toMatchObject({ status: 'covered', coveredBy: 'dev-7', relaxedTo: '35' });
		const later = judge({ state: 'computed', result: r, targets, deviations: [dev], now: new Date('2026-07-01') });
		expect(later.verdict).toBe('noncompliant');
		const revoked = judge({ state: 'computed', result: r, targets, deviations: [{ ...dev, revokedAt: now }], now });
		expect(revoked.verdict).toBe('noncompliant');
	});

	it('stays noncompliant when the deviation does not relax far enough', () => {
		const dev: DeviationInput = { id: 'd', relaxed: { minPhaseMarginDeg: '40' }, startsAt: new Date(0), expiresAt: new Date('2030-01-01') };
		expect(judge({ state: 'computed', result: result({ phaseMarginDeg: 38.5 }), targets, deviations: [dev], now }).verdict).toBe('noncompliant');
	});

	it('checks every gain crossover of every case against the crossover band', () => {
		const t = { crossoverMinHz: '50', crossoverMaxHz: '200' };
		expect(judge({ state: 'computed', result: result({}, [80, 150]), targets: t, now }).verdict).toBe('compliant');
		const j = judge({ state: 'computed', result: result({}, [80, 260]), targets: t, now });
		expect(j.criteria[0]).toMatchObject({ status: 'fail', actual: 260, shortfall: '60' });
		expect(judge({ state: 'computed', result: result({}, []), targets: t, now }).criteria[0].note).toBe('no gain crossover');
	});

	it('treats a samples target on a continuous loop as not applicable', () => {
		const j = judge({ state: 'computed', result: result(), targets: { minDelayMarginSamples: '2' }, now });
		expect(j.criteria[0].status).toBe('not-applicable');
		expect(j.verdict).toBe('compliant');
	});

	it('reports the states without a computed revision as they are', () => {
		for (const state of ['empty', 'pending', 'rejected'] as const) {
			expect(judge({ state, targets, now }).verdict).toBe(state);
		}
	});
});
