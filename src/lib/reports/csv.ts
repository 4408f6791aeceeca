/**
 * The CSV export: one row per loop and criterion (a loop with no judged criteria, e.g. no
 * revision yet, gets one row with the criterion columns empty). RFC 4180: CRLF line ends, every
 * field quoted when it holds a comma, quote, CR or LF, quotes doubled. Cells a spreadsheet would
 * run as a formula (starting with = + - @, or a tab/CR) are prefixed with an apostrophe; numbers
 * we write ourselves are never prefixed, so negative margins stay numbers.
 */
import { CRITERION_LABELS, CRITERION_UNITS } from '../compliance/criteria';
import type { CriterionResult } from '../compliance/judge';
import type { ReportData, ReportLoop } from './types';

/** The columns, in order; README.md documents each. */
export const CSV_COLUMNS = [
	'product',
	'loop_key',
	'loop_name',
	'class',
	'requirement_version',
	'verdict',
	'revision',
	'revision_sha256',
	'judged_at',
	'criterion',
	'status',
	'comparison',
	'required',
	'actual',
	'unit',
	'shortfall',
	'case',
	'deviation',
	'note'
] as const;
type Column = (typeof CSV_COLUMNS)[number];

/** A value from us (a number) or from people (text, which may start with anything). */
type Cell = string | number | null | undefined;

const FORMULA = /^[=+\-@\t\r]/;

export function csvCell(value: Cell): string {
	if (value === null || value === undefined) return '';
	let text: string;
	if (typeof value === 'number') {
		text = Number.isFinite(value) ? String(value) : '';
	} else {
		text = FORMULA.test(value) ? `'${value}` : value;
	}
	return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function csvLine(cells: Cell[]): string {
	return cells.map(csvCell).join(',');
}

function loopCells(loop: ReportLoop): Partial<Record<Column, Cell>> {
	return {
		product: loop.product.key,
		loop_key: loop.key,
		loop_name: loop.name,
		class: loop.class.key,
		requirement_version: loop.requirement?.version ?? null,
		verdict: loop.verdict,
		revision: loop.revision?.number ?? null,
		revision_sha256: loop.revision?.sha256 ?? null,
		judged_at: loop.judgedAt
	};
}

function criterionCells(c: CriterionResult): Partial<Record<Column, Cell>> {
	return {
		criterion: CRITERION_LABELS[c.criterion],
		status: c.status,
		comparison: c.comparison,
		// Thresholds are exact decimal strings; written as text, they are still not formulas.
		required: c.required,
		actual: c.actual,
		unit: CRITERION_UNITS[c.criterion] === '°' ? 'deg' : CRITERION_UNITS[c.criterion],
		shortfall: c.shortfall,
		case: c.fromCase ?? null,
		deviation: c.coveredBy
			? `${c.coveredBy}${c.relaxedTo ? ` (relaxed to ${c.relaxedTo})` : ''}`
			: null,
		note: c.note ?? null
	};
}

/** Rows as cell arrays (header first), for tests and the file. */
export function csvRows(loops: ReportLoop[]): Cell[][] {
	const rows: Cell[][] = [[...CSV_COLUMNS]];
	for (const loop of loops) {
		const base = loopCells(loop);
		const criteria = loop.criteria.length ? loop.criteria : [null];
		for (const c of criteria) {
			const cells = { ...base, ...(c ? criterionCells(c) : {}) };
			rows.push(CSV_COLUMNS.map((col) => cells[col]));
		}
	}
	return rows;
}

export function renderCsv(report: Pick<ReportData, 'loops'>): string {
	return csvRows(report.loops).map(csvLine).join('\r\n') + '\r\n';
}
