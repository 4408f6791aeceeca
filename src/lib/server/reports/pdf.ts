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
import { createRequire } from 'node:module';
import PDFDocument from 'pdfkit';
import { CRITERION_LABELS, type Criterion } from '../../compliance/criteria';
import type { CriterionResult, Verdict } from '../../compliance/judge';
import { VERDICTS } from '../../compliance/judge';
import { VERDICT_LABELS } from '../../compliance/labels';
import type { CaseResponse, MarginsResult } from '../../margins';
import { scopeInWords } from '../../reports/filters';
import type { ReportData, ReportLoop } from '../../reports/types';
import {
	actualText,
	pdfSafe,
	requiredText,
	shortfallText,
	STATUS_WORDS,
	targetsInWords
} from '../../reports/words';
import { CASE_DASH, CASE_INK, drawBode, drawNyquist } from './pdf-plots';
import { sfntFont } from './woff';
import { block, blockHeight, put } from './pdf-text';

type Doc = PDFKit.PDFDocument;

const require = createRequire(import.meta.url);
const FONTS = {
	sans: require.resolve('@fontsource/ibm-plex-sans/files/ibm-plex-sans-latin-400-normal.woff'),
	bold: require.resolve('@fontsource/ibm-plex-sans/files/ibm-plex-sans-latin-600-normal.woff'),
	mono: require.resolve('@fontsource/ibm-plex-mono/files/ibm-plex-mono-latin-400-normal.woff')
};

export const CAUTION =
	'Margins computed from a model are only as good as the model. Local codes, standards and licensed engineering judgement decide whether a loop is fit for service.';
const CAUTION_SHORT =
	'Results are only as good as the model; local codes, standards and licensed engineering judgement decide.';

const INK = '#1b2330';
const SOFT = '#4a5565';
const FAINT = '#7a8494';
const LINE = '#c9d0da';
const BRAND = '#1f5f8b';
/** Dark enough to read as grey on paper; the shape carries the meaning. */
const VERDICT_INK: Record<Verdict, string> = {
	compliant: '#1d6b3a',
	noncompliant: '#a3261b',
	covered: '#7a5a00',
	unstable: '#7b1f6a',
	pending: '#4a5565',
	rejected: '#5b3a1a',
	empty: '#6b7280'
};

const MARGIN = { top: 54, bottom: 62, left: 48, right: 48 };
const PAGE_W = 595.28;
const PAGE_H = 841.89;
const CONTENT_W = PAGE_W - MARGIN.left - MARGIN.right;
const BOTTOM = PAGE_H - MARGIN.bottom;

export interface LoopPlot {
	cases: CaseResponse[];
	margins: MarginsResult | null;
}

export interface PdfInput {
	report: ReportData;
	/** What the plot pages draw, by loop id: the sampled response and the stored margins. */
	plots: Map<string, LoopPlot>;
}

/** Loops that get a page of their own. */
export const needsPlotPage = (l: Pick<ReportLoop, 'verdict'>) =>
	l.verdict === 'noncompliant' || l.verdict === 'unstable';

export function verdictCounts(loops: Pick<ReportLoop, 'verdict'>[]): Record<Verdict, number> {
	const counts = Object.fromEntries(VERDICTS.map((v) => [v, 0])) as Record<Verdict, number>;
	for (const l of loops) counts[l.verdict]++;
	return counts;
}

/** The verdict shape (the same shapes as VerdictBadge) in a box of `s` points at x, y. */
function verdictShape(doc: Doc, verdict: Verdict, x: number, y: number, s = 8) {
	const k = s / 12;
	const ink = VERDICT_INK[verdict];
	doc.save().translate(x, y).scale(k);
	switch (verdict) {
		case 'compliant':
			doc.circle(6, 6, 5).fill(ink);
			doc
				.path('M3.5 6.2 5.2 7.8 8.6 4.3')
				.lineWidth(1.6)
				.lineCap('round')
				.lineJoin('round')
				.stroke('#ffffff');
			break;
		case 'noncompliant':
			doc.path('M1 2h10L6 11z').fill(ink);
			break;
		case 'covered':
			doc.path('M6 1 11 6 6 11 1 6z').lineWidth(1.4).stroke(ink);
			doc.path('M6 1 1 6 6 11z').fill(ink);
			break;
		case 'unstable':
			doc.path('M4 1h4l3 3v4l-3 3H4L1 8V4z').fill(ink);
			doc
				.path('M4.2 4.2 7.8 7.8M7.8 4.2 4.2 7.8')
				.lineWidth(1.4)
				.lineCap('round')
				.stroke('#ffffff');
			break;
		case 'pending':
			doc.circle(6, 6, 4.5).lineWidth(1.5).dash(2.2, { space: 1.6 }).stroke(ink);
			doc.undash();
			break;
		case 'rejected':
			doc.rect(1.5, 1.5, 9, 9).lineWidth(1.5).stroke(ink);
			doc.path('M2 10 10 2').lineWidth(1.5).stroke(ink);
			break;
		default:
			doc.path('M2 6h8').lineWidth(2).lineCap('round').stroke(ink);
	}
	doc.restore();
}

function verdictLabel(doc: Doc, verdict: Verdict, x: number, y: number, size = 8) {
	verdictShape(doc, verdict, x, y + size * 0.12, size);
	doc.font('bold').fontSize(size).fillColor(VERDICT_INK[verdict]);
	put(doc, VERDICT_LABELS[verdict], x + size * 1.35, y);
	doc.fillColor(INK);
}

const T = (s: string) => pdfSafe(s);

function heading(doc: Doc, text: string, size = 14) {
	doc
		.font('bold')
		.fontSize(size)
		.fillColor(INK)
		.text(T(text), MARGIN.left, doc.y, { width: CONTENT_W });
	doc.moveDown(0.3);
}

function keyValue(doc: Doc, rows: [string, string, ('mono' | 'sans')?][], labelW = 120) {
	for (const [k, v, font] of rows) {
		const y = doc.y;
		doc.font('sans').fontSize(9).fillColor(SOFT).text(k, MARGIN.left, y, { width: labelW });
		doc
			.font(font ?? 'sans')
			.fontSize(9)
			.fillColor(INK)
			.text(T(v), MARGIN.left + labelW, y, { width: CONTENT_W - labelW });
		doc.moveDown(0.25);
	}
}

const when = (iso: string | null) => (iso ? `${iso.slice(0, 10)} ${iso.slice(11, 19)} UTC` : '—');

function cover(doc: Doc, r: ReportData) {
	doc
		.font('bold')
		.fontSize(10)
		.fillColor(BRAND)
		.text('HEADROOM', MARGIN.left, MARGIN.top, { characterSpacing: 1.5 });
	doc.moveDown(0.6);
	doc.font('bold').fontSize(24).fillColor(INK).text('Compliance report');
	doc.moveDown(0.2);
	doc
		.font('sans')
		.fontSize(13)
		.fillColor(SOFT)
		.text(T(scopeInWords(r.filters)), { width: CONTENT_W });
	doc.moveDown(1);
	keyValue(doc, [
		['Generated', when(r.generatedAt)],
		['Requested by', `${r.requestedBy.name} <${r.requestedBy.email}>`],
		['Margin engine', r.engineVersion, 'mono'],
		['Report', r.id, 'mono'],
		['Loops', String(r.loops.length)]
	]);
	doc.moveDown(0.8);
	heading(doc, 'Verdicts', 12);
	const counts = verdictCounts(r.loops);
	const colW = CONTENT_W / 4;
	const top = doc.y;
	VERDICTS.forEach((v, i) => {
		const x = MARGIN.left + (i % 4) * colW;
		const y = top + Math.floor(i / 4) * 22;
		verdictLabel(doc, v, x, y, 9);
		doc.font('bold').fontSize(9).fillColor(INK);
		put(doc, String(counts[v]), x + colW - 40, y, { width: 30, align: 'right' });
	});
	doc.y = top + 2 * 22 + 6;
	doc.x = MARGIN.left;
	heading(doc, 'Requirement versions in force', 12);
	if (!r.requirements.length)
		doc.font('sans').fontSize(9).fillColor(SOFT).text('No loop class in scope has targets yet.');
	for (const q of r.requirements) {
		const y = doc.y;
		doc
			.font('bold')
			.fontSize(9)
			.fillColor(INK)
			.text(T(`${q.className} (${q.classKey}) · version ${q.version}`), MARGIN.left, y, {
				width: CONTENT_W
			});
		doc
			.font('sans')
			.fontSize(8.5)
			.fillColor(SOFT)
			.text(T(targetsInWords(q.targets)), { width: CONTENT_W });
		doc.moveDown(0.35);
	}
	const stale = r.loops.filter(
		(l) => l.requirement && !r.requirements.some((q) => q.requirementId === l.requirement!.id)
	);
	if (stale.length) {
		doc
			.font('sans')
			.fontSize(8.5)
			.fillColor(SOFT)
			.text(
				`${stale.length} loop(s) were last judged against an older version; their rows name the version used.`,
				{ width: CONTENT_W }
			);
	}
	doc.moveDown(1);
	const y = doc.y;
	doc.rect(MARGIN.left, y, CONTENT_W, 46).lineWidth(0.8).stroke(LINE);
	doc
		.font('bold')
		.fontSize(9)
		.fillColor(INK)
		.text('Caution', MARGIN.left + 10, y + 8);
	doc
		.font('sans')
		.fontSize(8.5)
		.fillColor(SOFT)
		.text(CAUTION, MARGIN.left + 10, y + 20, { width: CONTENT_W - 20 });
}

// ---- the loop table -------------------------------------------------------------------------

const MAIN: Criterion[] = ['phaseMargin', 'upperGainMargin', 'delayMarginSeconds', 'modulusMargin'];
const COLS = [
	{ title: 'Loop', w: 100 },
	{ title: 'Class · version', w: 60 },
	{ title: 'Rev', w: 20 },
	{ title: 'Verdict', w: 62 },
	{ title: 'Phase margin', w: 44 },
	{ title: 'Gain margin', w: 44 },
	{ title: 'Delay margin', w: 44 },
	{ title: 'Modulus', w: 44 }
];
const LAST_W = CONTENT_W - COLS.reduce((s, c) => s + c.w, 0);
const ALL_COLS = [...COLS, { title: 'Other criteria', w: LAST_W }];
const ROW_PAD = 3;

function tableHeader(doc: Doc) {
	const y = doc.y;
	// Two lines fit: "Phase / margin" wraps inside its column.
	doc.rect(MARGIN.left, y, CONTENT_W, 24).fill('#eef1f5');
	let x = MARGIN.left;
	for (const c of ALL_COLS) {
		doc
			.font('bold')
			.fontSize(7)
			.fillColor(SOFT)
			.text(c.title, x + 3, y + 3, { width: c.w - 6 });
		x += c.w;
	}
	doc.y = y + 24;
}

function cellCriterion(c: CriterionResult | undefined): {
	top: string;
	bottom: string;
	fail: boolean;
} {
	if (!c) return { top: '—', bottom: 'no target', fail: false };
	const mark = c.status === 'fail' ? ' fail' : c.status === 'covered' ? ' covered' : '';
	return { top: `${actualText(c)}${mark}`, bottom: requiredText(c), fail: c.status === 'fail' };
}

function tableRow(doc: Doc, l: ReportLoop, shade: boolean) {
	const texts: { top: string; bottom: string; fail?: boolean; mono?: boolean }[] = [
		{ top: `${l.product.key} / ${l.key}`, bottom: l.name },
		{ top: l.class.key, bottom: l.requirement ? `version ${l.requirement.version}` : 'not judged' },
		{ top: l.revision ? String(l.revision.number) : '—', bottom: '' },
		{ top: '', bottom: '' },
		...MAIN.map((k) => cellCriterion(l.criteria.find((c) => c.criterion === k))),
		{
			top: l.criteria
				.filter((c) => !MAIN.includes(c.criterion) && c.status !== 'not-applicable')
				.map(
					(c) =>
						`${CRITERION_LABELS[c.criterion]} ${actualText(c)} (${requiredText(c)}) ${STATUS_WORDS[c.status]}`
				)
				.join('; '),
			bottom: l.activeDeviations ? `${l.activeDeviations} active deviation(s)` : ''
		}
	];
	doc.fontSize(7);
	const heights = texts.map((t, i) => {
		const w = ALL_COLS[i].w - 6;
		doc.font(t.fail ? 'bold' : 'sans');
		const top = blockHeight(doc, T(t.top), w);
		doc.font('sans');
		return top + blockHeight(doc, T(t.bottom), w);
	});
	const h = Math.max(20, ...heights) + 2 * ROW_PAD;
	if (doc.y + h > BOTTOM) {
		doc.addPage();
		tableHeader(doc);
	}
	const y = doc.y;
	if (shade) doc.rect(MARGIN.left, y, CONTENT_W, h).fill('#f7f8fa');
	let x = MARGIN.left;
	texts.forEach((t, i) => {
		const w = ALL_COLS[i].w - 6;
		if (i === 3) {
			verdictLabel(doc, l.verdict, x + 3, y + ROW_PAD, 7);
		} else {
			doc
				.font(t.fail ? 'bold' : 'sans')
				.fontSize(7)
				.fillColor(t.fail ? VERDICT_INK.noncompliant : INK);
			block(doc, T(t.top), x + 3, y + ROW_PAD, w);
			if (t.bottom) {
				doc.font('sans').fontSize(7).fillColor(FAINT);
				block(doc, T(t.bottom), x + 3, doc.y, w);
			}
		}
		x += ALL_COLS[i].w;
	});
	doc
		.moveTo(MARGIN.left, y + h)
		.lineTo(MARGIN.left + CONTENT_W, y + h)
		.lineWidth(0.4)
		.stroke(LINE);
	doc.y = y + h;
	doc.x = MARGIN.left;
}

function loopTable(doc: Doc, loops: ReportLoop[]) {
	doc.addPage();
	heading(doc, 'Every loop: targets against actuals');
	doc
		.font('sans')
		.fontSize(8)
		.fillColor(SOFT)
		.text(
			'Each margin cell shows the worst case over all operating cases (top) and the target of the requirement version named in the class column (below). "fail" marks a shortfall; "covered" one an active deviation covers.',
			{ width: CONTENT_W }
		);
	doc.moveDown(0.5);
	if (!loops.length) {
		doc.font('sans').fontSize(10).fillColor(INK).text('No loop matches this scope.');
		return;
	}
	tableHeader(doc);
	loops.forEach((l, i) => tableRow(doc, l, i % 2 === 1));
}

// ---- a page per failing loop ----------------------------------------------------------------

function criteriaTable(doc: Doc, criteria: CriterionResult[]) {
	const cols = [
		{ t: 'Criterion', w: 120 },
		{ t: 'Required', w: 80 },
		{ t: 'Actual', w: 80 },
		{ t: 'Shortfall', w: 70 },
		{ t: 'Case', w: 90 },
		{ t: 'Status', w: CONTENT_W - 440 }
	];
	let y = doc.y;
	let x = MARGIN.left;
	doc.rect(MARGIN.left, y, CONTENT_W, 14).fill('#eef1f5');
	for (const c of cols) {
		doc.font('bold').fontSize(7.5).fillColor(SOFT);
		put(doc, c.t, x + 3, y + 4, { width: c.w - 6 });
		x += c.w;
	}
	y += 14;
	const rows = [...criteria].sort(
		(a, b) => Number(b.status === 'fail') - Number(a.status === 'fail')
	);
	for (const c of rows) {
		const values = [
			CRITERION_LABELS[c.criterion],
			requiredText(c),
			actualText(c),
			shortfallText(c),
			c.fromCase ?? '',
			STATUS_WORDS[c.status] + (c.relaxedTo ? ` (relaxed to ${c.relaxedTo})` : '')
		];
		x = MARGIN.left;
		values.forEach((v, i) => {
			const fail = c.status === 'fail' && i !== 4;
			doc
				.font(fail ? 'bold' : 'sans')
				.fontSize(8)
				.fillColor(fail ? VERDICT_INK.noncompliant : INK);
			put(doc, T(v), x + 3, y + 3, { width: cols[i].w - 6 });
			x += cols[i].w;
		});
		y += 15;
		doc
			.moveTo(MARGIN.left, y)
			.lineTo(MARGIN.left + CONTENT_W, y)
			.lineWidth(0.4)
			.stroke(LINE);
	}
	doc.y = y + 8;
	doc.x = MARGIN.left;
}

function legend(doc: Doc, cases: CaseResponse[], x: number, y: number) {
	cases.slice(0, CASE_DASH.length).forEach((c, i) => {
		const yy = y + i * 11;
		doc
			.moveTo(x, yy + 4)
			.lineTo(x + 18, yy + 4)
			.lineWidth(1.1);
		const dash = CASE_DASH[i];
		if (dash) doc.dash(dash[0], { space: dash[1] });
		doc.stroke(CASE_INK[i]);
		doc.undash();
		doc.font('sans').fontSize(7).fillColor(INK);
		put(doc, T(c.name), x + 22, yy, { width: 140 });
	});
	if (cases.length > CASE_DASH.length) {
		doc.font('sans').fontSize(7).fillColor(SOFT);
		put(
			doc,
			`… and ${cases.length - CASE_DASH.length} more case(s), not drawn`,
			x,
			y + CASE_DASH.length * 11
		);
	}
}

function loopPage(doc: Doc, l: ReportLoop, plot: LoopPlot | undefined) {
	doc.addPage();
	doc
		.font('sans')
		.fontSize(8)
		.fillColor(SOFT)
		.text(T(`${l.product.name} (${l.product.key})`), MARGIN.left, MARGIN.top);
	heading(doc, `${l.product.key} / ${l.key} — ${l.name}`, 15);
	verdictLabel(doc, l.verdict, MARGIN.left, doc.y, 10);
	doc.y += 16;
	doc.x = MARGIN.left;
	keyValue(
		doc,
		[
			[
				'Class',
				`${l.class.name} (${l.class.key})${l.requirement ? `, judged against version ${l.requirement.version}` : ''}`
			],
			['Owner', `${l.owner.name} <${l.owner.email}>`],
			['Revision', l.revision ? `${l.revision.number} · ${l.revision.fileName}` : '—'],
			['sha-256', l.revision?.sha256 ?? '—', 'mono'],
			['Judged', when(l.judgedAt)]
		],
		80
	);
	doc.moveDown(0.4);
	heading(
		doc,
		l.verdict === 'unstable' ? 'Criteria (the closed loop is unstable)' : 'Failing criteria first',
		10
	);
	if (l.criteria.length) criteriaTable(doc, l.criteria);
	else doc.font('sans').fontSize(8).fillColor(SOFT).text('No criteria were judged.').moveDown(0.5);
	if (!plot?.cases.length) {
		doc
			.font('sans')
			.fontSize(9)
			.fillColor(SOFT)
			.text('No plot: the judged revision has no sampled response.', MARGIN.left, doc.y + 6);
		return;
	}
	const avail = BOTTOM - doc.y - 12;
	// Bode magnitude over phase across the page, the Nyquist plot below it beside the legend.
	const nyq = Math.max(150, Math.min(230, avail * 0.5));
	const bodeH = Math.max(170, avail - nyq - 10);
	let y = doc.y + 4;
	drawBode(doc, plot.cases, plot.margins, MARGIN.left, y, CONTENT_W, bodeH);
	y += bodeH + 6;
	doc.font('bold').fontSize(7.5).fillColor(INK);
	put(doc, 'Nyquist', MARGIN.left + 42, y + 4);
	const forbidden = drawNyquist(
		doc,
		plot.cases,
		plot.margins,
		l.requirement?.targets ?? null,
		MARGIN.left,
		y,
		nyq
	);
	const lx = MARGIN.left + nyq + 16;
	legend(doc, plot.cases, lx, y + 8);
	if (forbidden.length) {
		doc
			.font('bold')
			.fontSize(7)
			.fillColor(INK)
			.text('Shaded: ruled out by the targets', lx, y + 70, { width: CONTENT_W - nyq - 16 });
		doc
			.font('sans')
			.fontSize(7)
			.fillColor(SOFT)
			.text(T(forbidden.join('\n')), lx, doc.y + 2, { width: CONTENT_W - nyq - 16 });
	}
	doc.y = y + nyq + 4;
	doc.x = MARGIN.left;
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
	doc.registerFont('sans', sfntFont(FONTS.sans));
	doc.registerFont('bold', sfntFont(FONTS.bold));
	doc.registerFont('mono', sfntFont(FONTS.mono));
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
