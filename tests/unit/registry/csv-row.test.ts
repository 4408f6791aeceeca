import { describe, expect, it } from 'vitest';
import { csvRow, parseCsv } from '../../../src/lib/registry/csv';

describe('csvRow', () => {
	it('quotes what needs quoting and reads back through the CSV reader', () => {
		const fields = ['plain', 'a,b', 'say "hi"', 'two\nlines', '', 'x'];
		const line = csvRow(fields);
		expect(line.endsWith('\r\n')).toBe(true);
		expect(parseCsv(line)[0].fields).toEqual(fields);
	});

	it('defuses text a spreadsheet would run as a formula, but leaves numbers alone', () => {
		expect(csvRow(['=SUM(A1)', '+1', '-x', '@cmd', -3.5, 0, null, undefined, Number.NaN])).toBe("'=SUM(A1),'+1,'-x,'@cmd,-3.5,0,,,\r\n");
	});
});
