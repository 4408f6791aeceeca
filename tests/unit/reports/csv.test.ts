import { describe, expect, it } from 'vitest';
import { CSV_COLUMNS, csvCell, csvRows, renderCsv } from '../../../src/lib/reports/csv';
import type { ReportLoop } from '../../../src/lib/reports/types';

const loop = (over: Partial<ReportLoop> = {}): ReportLoop => ({
	id: '00000000-0000-4000-8000-000000000001',
	key: 'ax1-speed',
	name: 'Axis 1 speed',
	product: { key: 'tarn-s2', name: 'Tarn S2' },
	class: { key: 'speed', name: 'Speed loop' },
	owner: { name: 'Emil', email: 'emil@veldmark.test' },
	tags: [],
	verdict: 'noncompliant',
	judgedAt: '2026-12-01T10:00:00.000Z',
	requirement: { id: 'r1', version: 3, targets: { minPhaseMarginDeg: '45' } },
	revision: {
		id: 'v1',
		number: 2,
		sha256: 'ab'.repeat(32),
		objectKey: 'models/x/y',
		fileName: 'm.json'
	},
	criteria: [
		{
			criterion: 'phaseMargin',
			status: 'fail',
			required: '45',
			comparison: 'at least',
			actual: 35.4254,
			shortfall: '9.5746',
			fromCase: 'cold'
		},
		{
			criterion: 'upperGainMargin',
			status: 'pass',
			required: '6',
			comparison: 'at least',
			actual: 7.96,
			shortfall: null,
			fromCase: 'nominal'
		}
	],
	failing: ['phaseMargin'],
	activeDeviations: 0,
	...over
});

/** A small RFC 4180 reader, to check the file parses back into the cells we meant. */
function parse(text: string): string[][] {
	const rows: string[][] = [];
	let row: string[] = [];
	let cell = '';
	let quoted = false;
	const endCell = () => {
		row.push(cell);
		cell = '';
	};
	for (let i = 0; i < text.length; i++) {
		const ch = text[i];
		if (quoted) {
			if (ch === '"' && text[i + 1] === '"') {
				cell += '"';
				i++;
			} else if (ch === '"') quoted = false;
			else cell += ch;
		} else if (ch === '"') quoted = true;
		else if (ch === ',') endCell();
		else if (ch === '\r' && text[i + 1] === '\n') {
			endCell();
			rows.push(row);
			row = [];
			i++;
		} else cell += ch;
	}
	return rows;
}

describe('report CSV', () => {
	it('writes one row per loop and criterion under the documented header', () => {
		const rows = csvRows([
			loop(),
			loop({
				id: 'b',
				key: 'ax2-speed',
				verdict: 'empty',
				criteria: [],
				failing: [],
				revision: null,
				requirement: null
			})
		]);
		expect(rows[0]).toEqual([...CSV_COLUMNS]);
		expect(rows).toHaveLength(1 + 2 + 1);
		const at = (r: number, col: (typeof CSV_COLUMNS)[number]) => rows[r][CSV_COLUMNS.indexOf(col)];
		expect(at(1, 'criterion')).toBe('Phase margin');
		expect(at(1, 'status')).toBe('fail');
		expect(at(1, 'shortfall')).toBe('9.5746');
		expect(at(1, 'case')).toBe('cold');
		expect(at(1, 'unit')).toBe('deg');
		expect(at(2, 'criterion')).toBe('Upper gain margin');
		expect(at(2, 'shortfall')).toBeNull();
		// A loop without judged criteria still has its row, criterion columns empty.
		expect(at(3, 'loop_key')).toBe('ax2-speed');
		expect(at(3, 'criterion')).toBeUndefined();
		expect(at(3, 'revision')).toBeNull();
	});

	it('quotes commas, quotes and line breaks as RFC 4180 says, with CRLF line ends', () => {
		const text = renderCsv({ loops: [loop({ name: 'Axis "1", speed\nloop' })] });
		expect(text.endsWith('\r\n')).toBe(true);
		expect(text).toContain('"Axis ""1"", speed\nloop"');
		const back = parse(text);
		expect(back[1][CSV_COLUMNS.indexOf('loop_name')]).toBe('Axis "1", speed\nloop');
		expect(back.every((r) => r.length === CSV_COLUMNS.length)).toBe(true);
	});

	it('defuses cells a spreadsheet would run as a formula, but keeps our negative numbers', () => {
		for (const bad of ['=HYPERLINK("http://x")', '+1+1', '-2+3', '@SUM(A1)', '\tx', '\rx']) {
			expect(csvCell(bad).replace(/^"/, '').startsWith("'")).toBe(true);
		}
		expect(csvCell(-12.5)).toBe('-12.5');
		expect(csvCell('plain')).toBe('plain');
		expect(csvCell(null)).toBe('');
		expect(csvCell(Number.NaN)).toBe('');
		const text = renderCsv({ loops: [loop({ name: '=cmd|" /C calc"!A0' })] });
		expect(parse(text)[1][CSV_COLUMNS.indexOf('loop_name')]).toBe(`'=cmd|" /C calc"!A0`);
	});
});
