import { describe, expect, it } from 'vitest';
import { inForceAt, trendPanels } from '../../../src/lib/history/trend';
import type { HistoryRequirement, HistoryRevision } from '../../../src/lib/history/types';
import type { WorstCase } from '../../../src/lib/margins/types';
import { fullTargets } from '../../../src/lib/registry/targets';

const requirement = (
	version: number,
	from: string,
	targets: Record<string, string>
): HistoryRequirement => ({
	id: `q${version}`,
	version,
	targets: fullTargets(targets),
	reason: 'test',
	author: { id: 'u', name: 'Lead' },
	inForceFrom: from,
	inForceUntil: null
});

const worst = (over: Partial<WorstCase> = {}): WorstCase => ({
	stable: true,
	unstablePoles: 0,
	upperGainMarginDb: 10,
	upperGainMarginHz: 300,
	lowerGainMarginDb: null,
	lowerGainMarginHz: null,
	phaseMarginDeg: 50,
	phaseMarginHz: 90,
	delayMarginSeconds: 0.002,
	delayMarginSamples: null,
	modulusMargin: 0.6,
	peakSensitivity: 1 / 0.6,
	peakSensitivityHz: 120,
	diskMargin: null,
	from: {},
	...over
});

const revision = (
	number: number,
	requirementVersion: number | null,
	w: WorstCase | null,
	state: HistoryRevision['state'] = 'computed'
): HistoryRevision => ({
	id: `r${number}`,
	number,
	state,
	note: '',
	fileName: 'm.json',
	sizeBytes: 10,
	sha256: null,
	sha256Short: null,
	uploadedBy: null,
	uploadedAt: '2026-01-01T00:00:00Z',
	computedAt: null,
	error: null,
	engineVersion: null,
	worstCase: w,
	caseNames: [],
	requirementVersion,
	verdict: null,
	laterVerdicts: []
});

const reqs = [
	requirement(1, '2026-01-01T00:00:00Z', { minPhaseMarginDeg: '45', maxPeakSensitivity: '2' }),
	requirement(2, '2026-02-01T00:00:00Z', {
		minPhaseMarginDeg: '55',
		minModulusMargin: '0.4',
		maxPeakSensitivity: '2'
	})
];

describe('trend panels', () => {
	it('finds the requirement version in force at a moment', () => {
		expect(inForceAt(reqs, '2025-12-31T00:00:00Z')).toBeNull();
		expect(inForceAt(reqs, '2026-01-15T00:00:00Z')?.version).toBe(1);
		expect(inForceAt(reqs, '2026-02-01T00:00:00Z')?.version).toBe(2);
	});

	it('judges each point against the target in force at its revision', () => {
		const [pm] = trendPanels([revision(1, 1, worst()), revision(2, 2, worst())], reqs);
		expect(pm.points.map((p) => [p.number, p.value, p.target, p.status])).toEqual([
			[1, 50, 45, 'pass'],
			[2, 50, 55, 'fail']
		]);
	});

	it('draws the stricter of the modulus minimum and 1 / max Ms', () => {
		const panels = trendPanels(
			[
				revision(1, 1, worst({ modulusMargin: 0.45, peakSensitivity: 1 / 0.45 })),
				revision(2, 2, worst())
			],
			reqs
		);
		const mod = panels.find((p) => p.key === 'modulusMargin')!;
		expect(mod.points.map((p) => [p.target, p.status])).toEqual([
			[0.5, 'fail'],
			[0.5, 'pass']
		]);
		expect(mod.points[0].targetText).toBe('at least 0.5 (Ms at most 2)');
	});

	it('marks unbounded, unstable, rejected and untargeted points', () => {
		const panels = trendPanels(
			[
				revision(1, 1, worst({ upperGainMarginDb: null })),
				revision(2, 1, worst({ stable: false, unstablePoles: 1 })),
				revision(3, 1, null, 'rejected'),
				revision(4, null, worst())
			],
			reqs
		);
		const gm = panels.find((p) => p.key === 'upperGainMargin')!;
		expect(gm.points.map((p) => [p.status, p.unbounded, p.text])).toEqual([
			['no-target', true, 'unbounded'],
			['unstable', false, 'unstable'],
			['rejected', false, 'rejected'],
			['no-target', false, '10.0 dB']
		]);
	});

	it('plots the delay margin in samples when the class asks for it, in seconds otherwise', () => {
		const sampled = worst({ delayMarginSeconds: 0.0004, delayMarginSamples: 4 });
		const keys = (q: HistoryRequirement[]) =>
			trendPanels([revision(1, 1, sampled)], q).map((p) => p.key);
		expect(keys(reqs)).toEqual(['phaseMargin', 'upperGainMargin', 'delayMargin', 'modulusMargin']);
		const samplesOnly = [requirement(1, '2026-01-01T00:00:00Z', { minDelayMarginSamples: '5' })];
		expect(keys(samplesOnly)).toEqual([
			'phaseMargin',
			'upperGainMargin',
			'delayMarginSamples',
			'modulusMargin'
		]);
		const both = [
			requirement(1, '2026-01-01T00:00:00Z', { minDelayMarginSeconds: '0.0002' }),
			requirement(2, '2026-02-01T00:00:00Z', { minDelayMarginSamples: '3' })
		];
		expect(keys(both)).toContain('delayMargin');
		// each point judged against its own version: v1 sets no samples target, v2 asks for 3
		const panel = trendPanels([revision(1, 1, sampled), revision(2, 2, sampled)], both).find(
			(p) => p.key === 'delayMarginSamples'
		)!;
		expect(panel.unit).toBe('samples');
		expect(panel.points.map((p) => [p.value, p.status, p.targetText])).toEqual([
			[4, 'no-target', 'no target'],
			[4, 'pass', 'at least 3 samples']
		]);
		const short = trendPanels([revision(1, 1, sampled)], samplesOnly)[2];
		expect(short.points[0].status).toBe('fail');
	});
});
