import { describe, expect, it } from 'vitest';
import {
	cleanFilters,
	filtersFromQuery,
	filtersToQuery,
	reportRequestSchema,
	scopeInWords
} from '../../../src/lib/reports/filters';
import {
	actualText,
	figure,
	pdfSafe,
	requiredText,
	targetsInWords
} from '../../../src/lib/reports/words';

describe('report scope in words', () => {
	it('says "all active loops" without filters', () => {
		expect(scopeInWords({})).toBe('All active loops');
	});

	it('says which loops by archive state, and their order', () => {
		expect(scopeInWords({ archived: 'archived' })).toBe('All archived loops');
		expect(scopeInWords({ verdict: 'unstable', archived: 'all' })).toBe(
			'Unstable loops, archived ones included'
		);
		expect(scopeInWords({ class: 'speed', sort: 'phaseMargin' })).toBe(
			'All active loops of class speed; sorted by phase margin, ascending'
		);
		expect(scopeInWords({ dir: 'desc' })).toBe('All active loops; sorted by loop key, descending');
	});

	it('reads every filter in a fixed order', () => {
		expect(
			scopeInWords({
				tag: 'axis-1',
				verdict: 'noncompliant',
				product: 'tarn-s2',
				class: 'speed',
				owner: 'emil@veldmark.test',
				failing: 'phaseMargin',
				q: 'ax1',
				changedSince: '2026-11-30'
			})
		).toBe(
			'Non-compliant loops of product tarn-s2, of class speed, owned by emil@veldmark.test, failing phase margin, tagged axis-1, with “ax1” in key or name, whose verdict changed since 2026-11-30'
		);
	});
});

describe('report filters', () => {
	it('refuse unknown names and bad values, naming the field', () => {
		const unknown = reportRequestSchema.safeParse({ format: 'pdf', filters: { colour: 'red' } });
		expect(unknown.success).toBe(false);
		expect(unknown.error?.issues[0]).toMatchObject({
			code: 'unrecognized_keys',
			path: ['filters'],
			keys: ['colour']
		});
		const verdict = reportRequestSchema.safeParse({ format: 'pdf', filters: { verdict: 'great' } });
		expect(verdict.error?.issues[0].path).toEqual(['filters', 'verdict']);
		const format = reportRequestSchema.safeParse({ format: 'docx' });
		expect(format.error?.issues[0].path).toEqual(['format']);
		const since = reportRequestSchema.safeParse({
			format: 'csv',
			filters: { changedSince: 'last week' }
		});
		expect(since.error?.issues[0].path).toEqual(['filters', 'changedSince']);
	});

	it('drop empty values and round-trip through a query string', () => {
		const parsed = reportRequestSchema.parse({
			format: 'csv',
			filters: { verdict: '', product: ' tarn-s2 ', changedSince: '2026-11-30T08:00Z' }
		});
		expect(cleanFilters(parsed.filters)).toEqual({
			product: 'tarn-s2',
			changedSince: '2026-11-30T08:00Z'
		});
		const query = filtersToQuery({ product: 'tarn-s2', failing: 'phaseMargin' }).toString();
		expect(query).toBe('product=tarn-s2&failing=phaseMargin');
		expect(filtersFromQuery(new URLSearchParams(query))).toEqual({
			product: 'tarn-s2',
			failing: 'phaseMargin'
		});
	});

	it('keep the valid part of a page link and ignore the paging', () => {
		expect(
			filtersFromQuery(
				new URLSearchParams('verdict=nonsense&class=speed&page=3&pageSize=25&sort=height')
			)
		).toEqual({ class: 'speed' });
	});

	it('keep the view: archive state, sort and direction; archived=active is the default', () => {
		const query = 'verdict=noncompliant&archived=all&sort=shortfall&dir=desc&page=2';
		const f = filtersFromQuery(new URLSearchParams(query));
		expect(f).toEqual({ verdict: 'noncompliant', archived: 'all', sort: 'shortfall', dir: 'desc' });
		expect(filtersToQuery(f).toString()).toBe(
			'verdict=noncompliant&archived=all&sort=shortfall&dir=desc'
		);
		expect(filtersFromQuery(new URLSearchParams('archived=active&q=ax'))).toEqual({ q: 'ax' });
		const bad = reportRequestSchema.safeParse({ format: 'pdf', filters: { dir: 'up' } });
		expect(bad.error?.issues[0].path).toEqual(['filters', 'dir']);
		expect(bad.error?.issues[0].message).toBe('dir must be one of asc, desc.');
		const archived = reportRequestSchema.safeParse({ format: 'pdf', filters: { archived: 'old' } });
		expect(archived.error?.issues[0].message).toBe(
			'archived must be one of active, archived, all.'
		);
	});
});

describe('report words', () => {
	it('write figures, targets and actuals with glyphs the embedded font has', () => {
		expect(figure(35.42541)).toBe('35.43');
		expect(figure(-8.04)).toBe('−8.04');
		expect(figure(0.000123)).toBe('1.230e-4');
		expect(figure(null)).toBe('—');
		expect(requiredText({ criterion: 'phaseMargin', comparison: 'at least', required: '45' })).toBe(
			'min 45°'
		);
		expect(
			requiredText({ criterion: 'peakSensitivity', comparison: 'at most', required: '2' })
		).toBe('max 2');
		expect(
			requiredText({ criterion: 'crossoverBand', comparison: 'within', required: '20–∞' })
		).toBe('from 20 Hz');
		expect(
			actualText({ criterion: 'upperGainMargin', actual: null, note: 'closed loop unstable' })
		).toBe('closed loop unstable');
		expect(targetsInWords({ minPhaseMarginDeg: '45', crossoverMaxHz: '300' })).toBe(
			'phase margin min 45°; crossover band 0–300 Hz'
		);
		expect(pdfSafe('PM ≥ 45 → ∞')).toBe('PM >= 45 -> no limit');
	});
});
