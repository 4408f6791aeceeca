import { describe, expect, it } from 'vitest';
import { judge } from '../../../src/lib/compliance/judge';
import { relativeShortfall, shortCriteria, worstShortfall } from '../../../src/lib/compliance/shortfall';
import { syntheticResult } from '../../../scripts/lib/synthetic-margins';

const now = new Date('2026-06-01T00:00:00Z');
const targets = { minPhaseMarginDeg: '45', minUpperGainMarginDb: '8', crossoverMinHz: '100', crossoverMaxHz: '300' };
const base = { phaseMarginDeg: 60, upperGainMarginDb: 10, delayMarginSeconds: 0.003, modulusMargin: 0.6, crossoverHz: 200 };

describe('relative shortfall', () => {
	it('is each shortfall over its threshold, the largest one for the loop', () => {
		const j = judge({ state: 'computed', result: syntheticResult({ ...base, phaseMarginDeg: 40, upperGainMarginDb: 6 }), targets, now });
		expect(shortCriteria(j)).toEqual(['upperGainMargin', 'phaseMargin']);
		expect(relativeShortfall(j.criteria.find((c) => c.criterion === 'phaseMargin')!)).toBeCloseTo(5 / 45, 12);
		expect(worstShortfall(j)).toBeCloseTo(2 / 8, 12);
	});

	it('measures a crossover outside the band against the bound it crossed', () => {
		const high = judge({ state: 'computed', result: syntheticResult({ ...base, crossoverHz: 330 }), targets, now });
		expect(worstShortfall(high)).toBeCloseTo(30 / 300, 12);
		const low = judge({ state: 'computed', result: syntheticResult({ ...base, crossoverHz: 90 }), targets, now });
		expect(worstShortfall(low)).toBeCloseTo(10 / 100, 12);
	});

	it('counts a covered shortfall, an unstable loop as the whole target, and nothing when all pass', () => {
		const deviation = { id: 'd', relaxed: { minPhaseMarginDeg: '40' }, startsAt: new Date('2026-01-01'), expiresAt: new Date('2027-01-01') };
		const covered = judge({ state: 'computed', result: syntheticResult({ ...base, phaseMarginDeg: 42 }), targets, deviations: [deviation], now });
		expect(covered.verdict).toBe('covered');
		expect(shortCriteria(covered)).toEqual(['phaseMargin']);
		expect(worstShortfall(covered)).toBeCloseTo(3 / 45, 12);
		const unstable = judge({ state: 'computed', result: syntheticResult({ ...base, stable: false }), targets, now });
		expect(worstShortfall(unstable)).toBe(1);
		expect(worstShortfall(judge({ state: 'computed', result: syntheticResult(base), targets, now }))).toBeNull();
		expect(worstShortfall(judge({ state: 'empty', targets, now }))).toBeNull();
	});
});
