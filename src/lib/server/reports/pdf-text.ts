/**
 * One line of text at a point, without pdfkit's line wrapper: `doc.text` with a `width` runs
 * the wrapper word by word even for a single short label, and labels (ticks, footers, cells) are
 * most of a report's text. Alignment and truncation are measured here with widthOfString (whose
 * layout pdfkit caches). Text that may need several lines still goes through doc.text.
 */
type Doc = PDFKit.PDFDocument;

export interface PutOptions {
	/** The box the line is aligned in and cut to (with an ellipsis) when it is longer. */
	width?: number;
	align?: 'left' | 'center' | 'right';
}

export function fitText(doc: Doc, text: string, width: number): string {
	if (doc.widthOfString(text) <= width) return text;
	let lo = 0;
	let hi = text.length;
	while (lo < hi) {
		const mid = Math.ceil((lo + hi) / 2);
		if (doc.widthOfString(`${text.slice(0, mid)}…`) <= width) lo = mid;
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
	const w = doc.widthOfString(line);
	const dx =
		options.width === undefined || !options.align || options.align === 'left'
			? 0
			: options.align === 'right'
				? options.width - w
				: (options.width - w) / 2;
	doc.text(line, x + dx, y, { lineBreak: false });
	return w;
}

/** Height of `text` in a column `width` wide: one line when it fits, else as pdfkit wraps it. */
export function blockHeight(doc: Doc, text: string, width: number): number {
	if (!text) return 0;
	return !text.includes('\n') && doc.widthOfString(text) <= width
		? doc.currentLineHeight(true)
		: doc.heightOfString(text, { width });
}

/** Text in a column: one `put` when it fits on a line, else wrapped by pdfkit. Leaves doc.y below it. */
export function block(doc: Doc, text: string, x: number, y: number, width: number): void {
	if (!text.includes('\n') && doc.widthOfString(text) <= width) {
		put(doc, text, x, y);
		doc.y = y + doc.currentLineHeight(true);
	} else {
		doc.text(text, x, y, { width });
	}
}
