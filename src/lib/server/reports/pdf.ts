/**
 * The PDF compliance report (pdfkit, IBM Plex Sans and Mono embedded from @fontsource's .woff
 * files — the .woff2 crashes pdfkit's subsetter). A4 portrait:
 *   1. cover: scope in words, time, engine version, requirement versions, counts per verdict,
 *      the caution note;
 *   2. a table of every loop, targets against actuals, header row repeated on every page;
 *   3. a page per non-compliant or unstable loop: failing criteria, Bode and Nyquist plots.
 * Every page carries "page N of M" and a footer with the caution in short. Verdicts are a word
 * and a shape, never a colour alone.
 */
import PDFDocument from 'pdfkit';
import { scopeInWords } from '../../reports/filters';
import type { ReportData } from '../../reports/types';
import { pdfSafe } from '../../reports/words';
import { cover } from './pdf-cover';
import { CONTENT_W, FAINT, LINE, MARGIN, PAGE_H, PAGE_W, when, type Doc } from './pdf-layout';
import { loopPage, needsPlotPage, type LoopPlot } from './pdf-loop-page';
import { loopTable } from './pdf-table';
import { put } from './pdf-text';
import { registerFonts } from './pdf-fonts';

export { CAUTION, verdictCounts } from './pdf-cover';
export { needsPlotPage, type LoopPlot } from './pdf-loop-page';

const CAUTION_SHORT =
	'Results are only as good as the model; local codes, standards and licensed engineering judgement decide.';

export interface PdfInput {
	report: ReportData;
	/** What the plot pages draw, by loop id: the sampled response and the stored margins. */
	plots: Map<string, LoopPlot>;
}

function footers(doc: Doc, r: ReportData) {
	const range = doc.bufferedPageRange();
	for (let i = range.start; i < range.start + range.count; i++) {
		doc.switchToPage(i);
		// Writing below the bottom margin would start a new page: lift it while drawing the footer.
		const saved = doc.page.margins.bottom;
		doc.page.margins.bottom = 0;
		const y = PAGE_H - MARGIN.bottom + 18;
		doc
			.moveTo(MARGIN.left, y - 6)
			.lineTo(PAGE_W - MARGIN.right, y - 6)
			.lineWidth(0.4)
			.stroke(LINE);
		doc.font('sans').fontSize(7).fillColor(FAINT);
		put(
			doc,
			`Headroom compliance report ${r.id.slice(0, 8)} · ${when(r.generatedAt)}`,
			MARGIN.left,
			y
		);
		put(doc, `page ${i + 1} of ${range.count}`, PAGE_W - MARGIN.right - 90, y, {
			width: 90,
			align: 'right'
		});
		put(doc, CAUTION_SHORT, MARGIN.left, y + 10, { width: CONTENT_W });
		doc.page.margins.bottom = saved;
	}
}

export async function renderPdf({ report, plots }: PdfInput): Promise<Uint8Array> {
	const doc = new PDFDocument({
		size: 'A4',
		margins: MARGIN,
		bufferPages: true,
		info: {
			Title: `Headroom compliance report — ${pdfSafe(scopeInWords(report.filters))}`,
			Author: pdfSafe(report.requestedBy.name),
			Subject: 'Stability-margin compliance',
			Creator: 'Headroom'
		}
	});
	registerFonts(doc);
	// Not as the constructor's default font: pdfkit would then cache the face under its own name
	// only, and open (parse) the font file again on every doc.font('sans').
	doc.font('sans');
	const chunks: Buffer[] = [];
	doc.on('data', (c: Buffer) => chunks.push(c));
	const done = new Promise<void>((resolve, reject) => {
		doc.on('end', resolve);
		doc.on('error', reject);
	});
	cover(doc, report);
	loopTable(doc, report.loops);
	for (const l of report.loops.filter(needsPlotPage)) loopPage(doc, l, plots.get(l.id));
	footers(doc, report);
	doc.end();
	await done;
	return new Uint8Array(Buffer.concat(chunks));
}
