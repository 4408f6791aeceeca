/**
 * A small RFC 4180 reader (quoted fields, doubled quotes, CRLF or LF, a BOM from spreadsheet
 * exports). Each record keeps the line it started on, so import errors can point at it.
 */
export interface CsvRecord {
	line: number;
	fields: string[];
}

export class CsvError extends Error {
	constructor(
		message: string,
		readonly line: number
	) {
		super(message);
	}
}

export function parseCsv(text: string): CsvRecord[] {
	const src = text.replace(/^\uFEFF/, '');
	const records: CsvRecord[] = [];
	let fields: string[] = [];
	let field = '';
	let line = 1;
	let start = 1;
	let quoted = false;
	let i = 0;
	const endRecord = () => {
		fields.push(field);
		// Blank lines (a lone empty field) are skipped: spreadsheets leave them at the end.
		if (!(fields.length === 1 && fields[0].trim() === '')) records.push({ line: start, fields });
		fields = [];
		field = '';
	};
	while (i < src.length) {
		const ch = src[i];
		if (quoted) {
			if (ch === '"' && src[i + 1] === '"') {
				field += '"';
				i += 2;
				continue;
			}
			if (ch === '"') quoted = false;
			else {
				if (ch === '\n') line++;
				field += ch;
			}
			i++;
			continue;
		}
		if (ch === '"' && field === '') quoted = true;
		else if (ch === ',') {
			fields.push(field);
			field = '';
		} else if (ch === '\n' || ch === '\r') {
			if (ch === '\r' && src[i + 1] === '\n') i++;
			endRecord();
			line++;
			start = line;
		} else field += ch;
		i++;
	}
	if (quoted) throw new CsvError('A quoted field is never closed.', start);
	if (field !== '' || fields.length) endRecord();
	return records;
}

/**
 * One CSV record (RFC 4180, CRLF). Text that a spreadsheet would run as a formula (=, +, -, @ at
 * the start) gets a leading apostrophe; numbers are passed as numbers and left alone.
 */
export function csvRow(fields: (string | number | null | undefined)[]): string {
	return (
		fields
			.map((f) => {
				if (f === null || f === undefined) return '';
				if (typeof f === 'number') return Number.isFinite(f) ? String(f) : '';
				const safe = /^[=+\-@\t\r]/.test(f) ? `'${f}` : f;
				return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
			})
			.join(',') + '\r\n'
	);
}
