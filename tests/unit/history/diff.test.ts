import { describe, expect, it } from 'vitest';
import { diffRevisions, type RevisionSide } from '../../../src/lib/history/diff';
import { diffSummaries } from '../../../src/lib/history/model-diff';
import type { CaseResult, MarginFigures, MarginsResult } from '../../../src/lib/margins/types';
import type { ModelSummary } from '../../../src/lib/margins/summary';

const figures = (over: Partial<MarginFigures> = {}): MarginFigures => ({
	stable: true,
	unstablePoles: 0,
	upperGainMarginDb: 12.4,
	upperGainMarginHz: 310,
	lowerGainMarginDb: null,
	lowerGainMarginHz: null,
	phaseMarginDeg: 51.3,
	phaseMarginHz: 95.1,
	delayMarginSeconds: 0.0015,
	delayMarginSamples: null,
	modulusMargin: 0.62,
	peakSensitivity: 1 / 0.62,
	peakSensitivityHz: 140,
	diskMargin: { alpha: 0.9, gainDb: 8.6, phaseDeg: 48.5 },
	...over
});

function result(
	cases: Record<string, Partial<MarginFigures>>,
	worst: Partial<MarginFigures> = Object.values(cases)[0]
): MarginsResult {
	const list: CaseResult[] = Object.entries(cases).map(([name, f]) => ({
		name,
		...figures(f),
		gainCrossovers: [{ hz: f.phaseMarginHz ?? 95.1, phaseMarginDeg: f.phaseMarginDeg ?? 51.3 }],
		phaseCrossovers: []
	}));
	const first = Object.keys(cases)[0];
	return {
		format: 'headroom-margins/1',
		engine: 'test',
		cases: list,
		worstCase: { ...figures(worst), from: { phaseMarginDeg: first } }
	};
}

const side = (
	number: number,
	r: MarginsResult | null,
	over: Partial<RevisionSide> = {}
): RevisionSide => ({
	number,
	state: r ? 'computed' : 'rejected',
	result: r,
	summary: null,
	...over
});

const texts = (a: RevisionSide, b: RevisionSide) =>
	diffRevisions(a, b).sentences.map((s) => s.text);

describe('revision diff wording', () => {
	it('tells a phase margin that fell, in degrees, since the older revision', () => {
		const d = diffRevisions(
			side(4, result({ nominal: { phaseMarginDeg: 51.3 } })),
			side(6, result({ nominal: { phaseMarginDeg: 39.3 } }))
		);
		expect(d.sentences[0]).toEqual({
			text: 'Phase margin fell 12.0° since revision 4 (51.3° → 39.3°).',
			tone: 'worse'
		});
		const pm = d.worstCase.find((f) => f.key === 'phaseMarginDeg')!;
		expect(pm.delta).toBeCloseTo(-12, 9);
		expect(pm.tone).toBe('worse');
	});

	it('tells relative figures in percent, and a rise of a margin as better', () => {
		const d = diffRevisions(
			side(1, result({ nominal: { delayMarginSeconds: 0.002 } })),
			side(2, result({ nominal: { delayMarginSeconds: 0.0027 } }))
		);
		const s = d.sentences.find((x) => x.text.startsWith('Delay margin'))!;
		expect(s).toEqual({
			text: 'Delay margin rose 35 % since revision 1 (2 ms → 2.7 ms).',
			tone: 'better'
		});
	});

	it('knows that a lower peak sensitivity is better', () => {
		const d = diffRevisions(
			side(1, result({ nominal: { peakSensitivity: 2 } })),
			side(2, result({ nominal: { peakSensitivity: 1.5 } }))
		);
		const ms = d.worstCase.find((f) => f.key === 'peakSensitivity')!;
		expect(ms.changeText).toBe('fell 25 %');
		expect(ms.tone).toBe('better');
	});

	it('words a lower gain margin (negative) as widening or narrowing', () => {
		const d = diffRevisions(
			side(1, result({ nominal: { lowerGainMarginDb: -8 } })),
			side(2, result({ nominal: { lowerGainMarginDb: -6 } }))
		);
		const lower = d.worstCase.find((f) => f.key === 'lowerGainMarginDb')!;
		expect(lower.changeText).toBe('narrowed 2.0 dB');
		expect(lower.beforeText).toBe('−8.0 dB');
		expect(lower.tone).toBe('worse');
	});

	it('treats null as unbounded for gain margins, in both directions', () => {
		const bounded = result({ nominal: { upperGainMarginDb: 12.4 } });
		const unbounded = result({ nominal: { upperGainMarginDb: null, upperGainMarginHz: null } });
		expect(texts(side(2, bounded), side(3, unbounded))).toContain(
			'Upper gain margin became unbounded since revision 2 (12.4 dB → unbounded).'
		);
		const back = diffRevisions(side(3, unbounded), side(4, bounded)).worstCase.find(
			(f) => f.key === 'upperGainMarginDb'
		)!;
		expect(back).toMatchObject({
			changeText: 'became finite (12.4 dB)',
			tone: 'worse',
			afterText: '12.4 dB',
			beforeText: 'unbounded'
		});
		expect(
			diffRevisions(side(3, unbounded), side(4, unbounded)).worstCase.find(
				(f) => f.key === 'upperGainMarginDb'
			)
		).toMatchObject({ tone: 'same', changeText: null });
	});

	it('says the loop became unstable once, instead of every margin vanishing', () => {
		const unstable = result({
			nominal: {
				stable: false,
				unstablePoles: 2,
				upperGainMarginDb: null,
				phaseMarginDeg: null,
				delayMarginSeconds: null,
				modulusMargin: 0.1,
				diskMargin: null
			}
		});
		const d = diffRevisions(side(1, result({ nominal: {} })), side(2, unstable));
		expect(d.sentences[0]).toEqual({
			text: 'The loop became unstable (2 unstable closed-loop poles) since revision 1.',
			tone: 'worse'
		});
		expect(d.sentences.some((s) => /unbounded/.test(s.text))).toBe(false);
		const pm = d.worstCase.find((f) => f.key === 'phaseMarginDeg')!;
		expect(pm.afterText).toBe('— (unstable)');
		expect(pm.changeText).toBeNull();
		expect(texts(side(2, unstable), side(3, result({ nominal: {} })))[0]).toMatch(
			/^The loop became stable since revision 2/
		);
	});

	it('compares the cases by name and tells added and removed ones', () => {
		const a = result(
			{ cold: { phaseMarginDeg: 50 }, hot: { phaseMarginDeg: 45 } },
			{ phaseMarginDeg: 45 }
		);
		const b = result(
			{ cold: { phaseMarginDeg: 40 }, wet: { phaseMarginDeg: 60 } },
			{ phaseMarginDeg: 40 }
		);
		const d = diffRevisions(side(1, a), side(2, b));
		expect(d.cases.map((c) => [c.name, c.presence])).toEqual([
			['cold', 'both'],
			['hot', 'removed'],
			['wet', 'added']
		]);
		expect(d.cases[0].figures.find((f) => f.key === 'phaseMarginDeg')?.changeText).toBe(
			'fell 10.0°'
		);
		expect(d.sentences.map((s) => s.text)).toEqual(
			expect.arrayContaining([
				'Operating case “wet” added since revision 1.',
				'Operating case “hot” removed since revision 1.'
			])
		);
	});

	it('says nothing changed when the figures agree at the precision shown', () => {
		const d = diffRevisions(
			side(1, result({ nominal: { phaseMarginDeg: 45.01 } })),
			side(2, result({ nominal: { phaseMarginDeg: 45.02 } }))
		);
		expect(d.sentences).toEqual([
			{ text: 'No margin figure changed since revision 1 at the precision shown.', tone: 'same' }
		]);
	});

	it('explains a rejected revision instead of comparing margins', () => {
		const d = diffRevisions(
			side(1, result({ nominal: {} })),
			side(2, null, {
				error: { message: 'leading coefficient is zero', path: 'blocks[0].denominator' }
			})
		);
		expect(d.worstCase).toEqual([]);
		expect(d.notes).toEqual([
			'Revision 2 was rejected (leading coefficient is zero at blocks[0].denominator): it has no margins to compare.'
		]);
		expect(d.sentences).toEqual([]);
	});

	it('says a revision still computing has no margins yet', () => {
		const d = diffRevisions(
			side(1, result({ nominal: {} })),
			side(2, null, { state: 'computing' })
		);
		expect(d.notes[0]).toMatch(/Revision 2 is not computed yet/);
	});

	it('skips figures neither revision has (delay in samples of a continuous loop)', () => {
		const d = diffRevisions(side(1, result({ nominal: {} })), side(2, result({ nominal: {} })));
		expect(d.worstCase.map((f) => f.key)).not.toContain('delayMarginSamples');
		expect(d.worstCase.map((f) => f.key)).toContain('upperGainMarginDb');
	});
});

const summary = (over: Partial<ModelSummary> = {}): ModelSummary => ({
	sampled: false,
	sampleTimeSeconds: null,
	delaySeconds: 0.0001,
	blocks: ['pid: kp 1, ki 10, kd 0, derivative filter 0 s', 'factored: 0 zeros, 2 poles, gain 5'],
	cases: ['nominal'],
	order: 3,
	...over
});

describe('model summary diff', () => {
	it('lists every field and words the changed ones', () => {
		const rows = diffSummaries(
			summary(),
			summary({
				delaySeconds: 0.0002,
				blocks: [...summary().blocks, 'polynomial: numerator degree 0, denominator degree 1'],
				order: 4
			})
		);
		const changed = rows.filter((r) => r.changed).map((r) => r.sentence);
		expect(changed).toEqual([
			'loop delay changed from 100 µs to 200 µs',
			'order (nominal) changed from 3 to 4',
			'block 3 added (polynomial: numerator degree 0, denominator degree 1)'
		]);
		expect(rows.find((r) => r.field === 'kind')).toMatchObject({
			changed: false,
			before: 'continuous',
			after: 'continuous'
		});
	});

	it('tells a loop that became sampled once, not also as a new sample time', () => {
		const rows = diffSummaries(summary(), summary({ sampled: true, sampleTimeSeconds: 0.0000625 }));
		expect(rows.filter((r) => r.sentence).map((r) => r.sentence)).toEqual([
			'the loop became sampled (was continuous)'
		]);
		expect(rows.find((r) => r.field === 'sampleTime')).toMatchObject({
			changed: true,
			after: '62.5 µs'
		});
	});

	it('reports case changes, and nothing when a summary is missing', () => {
		const rows = diffSummaries(
			summary({ cases: ['cold', 'hot'] }),
			summary({ cases: ['cold', 'wet'] })
		);
		expect(rows.find((r) => r.field === 'cases')?.sentence).toBe(
			'operating cases added “wet”; removed “hot”'
		);
		expect(diffSummaries(null, summary())).toEqual([]);
	});

	it('puts model changes among the diff sentences, without repeating case changes', () => {
		const a = side(1, result({ nominal: {} }), { summary: summary() });
		const b = side(2, result({ nominal: {} }), { summary: summary({ delaySeconds: 0.0003 }) });
		expect(texts(a, b)).toContain(
			'Model: loop delay changed from 100 µs to 300 µs since revision 1.'
		);
	});
});

describe('crossovers and unchanged structure', () => {
	it('shows one gain-crossover row when each side has a single crossover', () => {
		const d = diffRevisions(
			side(1, result({ nominal: { phaseMarginHz: 100 } })),
			side(2, result({ nominal: { phaseMarginHz: 150 } }))
		);
		const rows = d.worstCase.filter(
			(f) => f.key === 'crossoverLowHz' || f.key === 'crossoverHighHz'
		);
		expect(rows).toMatchObject([
			{
				key: 'crossoverLowHz',
				label: 'gain crossover',
				changeText: 'moved up 50 %',
				tone: 'neutral'
			}
		]);
	});

	it('says the model kept its structure when only the numbers inside changed', () => {
		const d = diffRevisions(
			side(1, result({ nominal: {} }), { summary: summary() }),
			side(2, result({ nominal: {} }), { summary: summary() })
		);
		expect(d.sentences.map((s) => s.text)).toContain(
			'Model: same structure since revision 1 (blocks, order, cases, timing); the file differs in its coefficients or text.'
		);
	});
});
