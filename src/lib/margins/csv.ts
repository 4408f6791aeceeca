/**
 * A measured response as CSV: header `hz,magnitude_db,phase_deg`, one point per line. It becomes
 * a continuous loop with one measured block and no open-loop unstable poles. Refusals name the line.
 */
import { issue } from './issues';
import { MAX_MEASURED_POINTS } from './limits';
import { MODEL_FORMAT } from './schema';
import type { ModelIssue } from './types';

export const CSV_HEADER = 'hz,magnitude_db,phase_deg';
const COLUMNS = ['hz', 'magnitude_db', 'phase_deg'];
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

const normalise = (line: string) => line.replace(/\s+/g, '').toLowerCase();

export const looksLikeCsv = (firstLine: string): boolean => normalise(firstLine) === CSV_HEADER;

export type CsvOutcome = { ok: true; data: unknown } | { ok: false; issue: ModelIssue };

export function csvToModel(text: string): CsvOutcome {
	const lines = text.split(/\r\n|\n|\r/);
	const hz: number[] = [];
	const magnitudeDb: number[] = [];
	const phaseDeg: number[] = [];
	let header = false;
	for (let i = 0; i < lines.length; i++) {
		const line = lines[i].trim();
		const where = `line ${i + 1}`;
		if (line === '' || line.startsWith('#')) continue;
		if (!header) {
			if (!looksLikeCsv(line))
				return { ok: false, issue: issue(where, `expected the header ${CSV_HEADER}`) };
			header = true;
			continue;
		}
		const fields = line.split(',').map((f) => f.trim());
		if (fields.length !== 3)
			return {
				ok: false,
				issue: issue(where, `expected 3 values (${COLUMNS.join(', ')}), got ${fields.length}`)
			};
		const values: number[] = [];
		for (const [j, field] of fields.entries()) {
			if (!NUMBER.test(field))
				return {
					ok: false,
					issue: issue(where, `${COLUMNS[j]} ${JSON.stringify(field)} is not a number`)
				};
			const v = Number(field);
			if (!Number.isFinite(v))
				return { ok: false, issue: issue(where, `${COLUMNS[j]} ${field} is not a finite number`) };
			values.push(v);
		}
		if (!(values[0] > 0))
			return { ok: false, issue: issue(where, `hz must be > 0 (got ${values[0]})`) };
		if (hz.length > 0 && !(values[0] > hz[hz.length - 1]))
			return {
				ok: false,
				issue: issue(
					where,
					`hz must be strictly increasing: ${values[0]} does not exceed ${hz[hz.length - 1]}`
				)
			};
		if (hz.length >= MAX_MEASURED_POINTS)
			return { ok: false, issue: issue(where, `more than ${MAX_MEASURED_POINTS} points`) };
		hz.push(values[0]);
		magnitudeDb.push(values[1]);
		phaseDeg.push(values[2]);
	}
	if (!header)
		return {
			ok: false,
			issue: issue('', `the CSV file is empty: expected the header ${CSV_HEADER}`)
		};
	if (hz.length < 2)
		return {
			ok: false,
			issue: issue('', `a measured response needs at least 2 points, the CSV file has ${hz.length}`)
		};
	return {
		ok: true,
		data: {
			format: MODEL_FORMAT,
			blocks: [{ type: 'measured', hz, magnitudeDb, phaseDeg, openLoopUnstablePoles: 0 }]
		}
	};
}
