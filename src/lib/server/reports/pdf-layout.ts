/**
 * The report's page: A4 portrait geometry, the inks, and the small text blocks every part of
 * the PDF uses (headings, key–value rows, times). Text goes through T (pdfSafe) first.
 */
import { pdfSafe } from '../../reports/words';
import { flow } from './pdf-text';

export type Doc = PDFKit.PDFDocument;

export const INK = '#1b2330';
export const SOFT = '#4a5565';
export const FAINT = '#7a8494';
export const LINE = '#c9d0da';
export const BRAND = '#1f5f8b';

export const MARGIN = { top: 54, bottom: 62, left: 48, right: 48 };
export const PAGE_W = 595.28;
export const PAGE_H = 841.89;
export const CONTENT_W = PAGE_W - MARGIN.left - MARGIN.right;
export const BOTTOM = PAGE_H - MARGIN.bottom;

export const T = (s: string) => pdfSafe(s);

export function heading(doc: Doc, text: string, size = 14) {
	doc.font('bold').fontSize(size).fillColor(INK);
	flow(doc, T(text), MARGIN.left, doc.y, CONTENT_W);
	doc.moveDown(0.3);
}

export function keyValue(doc: Doc, rows: [string, string, ('mono' | 'sans')?][], labelW = 120) {
	for (const [k, v, font] of rows) {
		const y = doc.y;
		doc.font('sans').fontSize(9).fillColor(SOFT).text(k, MARGIN.left, y, { width: labelW });
		doc
			.font(font ?? 'sans')
			.fontSize(9)
			.fillColor(INK);
		flow(doc, T(v), MARGIN.left + labelW, y, CONTENT_W - labelW);
		doc.moveDown(0.25);
	}
}

export const when = (iso: string | null) =>
	iso ? `${iso.slice(0, 10)} ${iso.slice(11, 19)} UTC` : '—';
