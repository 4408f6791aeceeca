/**
 * One line of text at a point, without pdfkit's line wrapper: `doc.text` with a `width` runs
 * the wrapper word by word even for a single short label, and labels (ticks, footers, cells) are
 * most of a report's text. Alignment and truncation are measured here with widthOfString (whose
 * layout pdfkit caches). Text that may need several lines still goes through doc.text.
 */
import { widthOf, withRuns } from './pdf-fonts';

type Doc = PDFKit.PDFDocument;

export interface PutOptions {
	/** The box the line is aligned in and cut to (with an ellipsis) when it is longer. */
	width?: number;
	align?: 'left' | 'center' | 'right';
}

export function fitText(doc: Doc, text: string, width: number): string {
	if (widthOf(doc, text) <= width) return text;
	let lo = 0;
	let hi = text.length;
	while (lo < hi) {
		const mid = Math.ceil((lo + hi) / 2);
		if (widthOf(doc, `${text.slice(0, mid)}…`) <= width) lo = mid;
		else hi = mid - 1;
	}
	return `${text.slice(0, lo)}…`;
}

/** Draw one line with the current font, size and colour; returns its width. */
export function put(
	doc: Doc,
	text: string,
	x: number,
	y: number,
	options: PutOptions = {}
): number {
	const line = options.width === undefined ? text : fitText(doc, text, options.width);
	const w = widthOf(doc, line);
	const dx =
		options.width === undefined || !options.align || options.align === 'left'
			? 0
			: options.align === 'right'
				? options.width - w
				: (options.width - w) / 2;
	let at = x + dx;
	// Run by run: characters the face's latin subset lacks come from its other subsets.
	withRuns(doc, line, (r) => {
		doc.text(r.text, at, y, { lineBreak: false });
		at += doc.widthOfString(r.text);
	});
	return w;
}

/** Height of `text` in a column `width` wide: one line when it fits, else as pdfkit wraps it. */
export function blockHeight(doc: Doc, text: string, width: number): number {
	if (!text) return 0;
	return !text.includes('\n') && widthOf(doc, text) <= width
		? doc.currentLineHeight(true)
		: doc.heightOfString(text, { width });
}

/** Text in a column: one `put` when it fits on a line, else wrapped by pdfkit. Leaves doc.y below it. */
export function block(doc: Doc, text: string, x: number, y: number, width: number): void {
	if (!text.includes('\n') && widthOf(doc, text) <= width) {
		put(doc, text, x, y);
		doc.y = y + doc.currentLineHeight(true);
	} else {
		flow(doc, text, x, y, width);
	}
}

/** Text wrapped by pdfkit in a column, run by run (see pdf-fonts.ts); leaves doc.y below it. */
export function flow(doc: Doc, text: string, x: number, y: number, width: number): void {
	withRuns(doc, text, (r, i, all) => {
		const options = { width, continued: i < all.length - 1 };
		if (i === 0) doc.text(r.text, x, y, options);
		else doc.text(r.text, options);
	});
}
