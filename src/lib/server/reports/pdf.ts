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
import type { CaseResponse } from '../../margins';
import { scopeInWords } from '../../reports/filters';
import type { ReportData, ReportLoop } from '../../reports/types';
import { actualText, pdfSafe, requiredText, shortfallText, STATUS_WORDS, targetsInWords } from '../../reports/words';
import { bodeFrames, nyquistFrame, type PlotFrame } from './fallback-plots';
import { sfntFont } from './woff';

type Doc = PDFKit.PDFDocument;

const require = createRequire(import.meta.url);
const FONTS = {
	sans: require.resolve('@fontsource/ibm-plex-sans/files/ibm-plex-sans-latin-400-normal.woff'),
	bold: require.resolve('@fontsource/ibm-plex-sans/files/ibm-plex-sans-latin-600-normal.woff'),
	mono: require.resolve('@fontsource/ibm-plex-mono/files/ibm-plex-mono-latin-400-normal.woff')
};

export const CAUTION =
	'Margins computed from a model are only as good as the model. Local codes, standards and licensed engineering judgement decide whether a loop is fit for service.';
const CAUTION_SHORT = 'Results are only as good as the model; local codes, standards and licensed engineering judgement decide.';

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
/** Curves per case differ by dash pattern as well as shade. */
const CASE_DASH: (number[] | null)[] = [null, [4, 2], [1.2, 1.6], [6, 2, 1.2, 2]];
const CASE_INK = ['#1f5f8b', '#a3261b', '#1d6b3a', '#7b1f6a'];

const MARGIN = { top: 54, bottom: 62, left: 48, right: 48 };
const PAGE_W = 595.28;
const PAGE_H = 841.89;
const CONTENT_W = PAGE_W - MARGIN.left - MARGIN.right;
const BOTTOM = PAGE_H - MARGIN.bottom;

export interface PdfInput {
	report: ReportData;
	/** Sampled responses of the loops that get a plot page, by loop id. */
	responses: Map<string, CaseResponse[]>;
}

/** Loops that get a page of their own. */
export const needsPlotPage = (l: Pick<ReportLoop, 'verdict'>) => l.verdict === 'noncompliant' || l.verdict === 'unstable';

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
			doc.path('M3.5 6.2 5.2 7.8 8.6 4.3').lineWidth(1.6).lineCap('round').lineJoin('round').stroke('#ffffff');
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
			doc.path('M4.2 4.2 7.8 7.8M7.8 4.2 4.2 7.8').lineWidth(1.4).lineCap('round').stroke('#ffffff');
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
	doc.font('bold').fontSize(size).fillColor(VERDICT_INK[verdict]).text(VERDICT_LABELS[verdict], x + size * 1.35, y, { lineBreak: false });
	doc.fillColor(INK);
}

const T = (s: string) => pdfSafe(s);

function heading(doc: Doc, text: string, size = 14) {
	doc.font('bold').fontSize(size).fillColor(INK).text(T(text), MARGIN.left, doc.y, { width: CONTENT_W });
	doc.moveDown(0.3);
}

/**
 * Mono only for identifiers without blanks: the space glyph of the Plex Mono .woff subset has
 * broken outline data that fontkit cannot decode.
 */
const monoOk = (v: string) => !/\s/.test(v);

function keyValue(doc: Doc, rows: [string, string, ('mono' | 'sans')?][], labelW = 120) {
	for (const [k, v, font] of rows) {
		const y = doc.y;
		doc.font('sans').fontSize(9).fillColor(SOFT).text(k, MARGIN.left, y, { width: labelW });
		doc.font(font === 'mono' && monoOk(v) ? 'mono' : 'sans').fontSize(9).fillColor(INK).text(T(v), MARGIN.left + labelW, y, { width: CONTENT_W - labelW });
		doc.moveDown(0.25);
	}
}

const when = (iso: string | null) => (iso ? `${iso.slice(0, 10)} ${iso.slice(11, 19)} UTC` : '—');

function cover(doc: Doc, r: ReportData) {
	doc.font('bold').fontSize(10).fillColor(BRAND).text('HEADROOM', MARGIN.left, MARGIN.top, { characterSpacing: 1.5 });
	doc.moveDown(0.6);
	doc.font('bold').fontSize(24).fillColor(INK).text('Compliance report');
	doc.moveDown(0.2);
	doc.font('sans').fontSize(13).fillColor(SOFT).text(T(scopeInWords(r.filters)), { width: CONTENT_W });
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
		doc.font('bold').fontSize(9).fillColor(INK).text(String(counts[v]), x + colW - 40, y, { width: 30, align: 'right', lineBreak: false });
	});
	doc.y = top + 2 * 22 + 6;
	doc.x = MARGIN.left;
	heading(doc, 'Requirement versions in force', 12);
	if (!r.requirements.length) doc.font('sans').fontSize(9).fillColor(SOFT).text('No loop class in scope has targets yet.');
	for (const q of r.requirements) {
		const y = doc.y;
		doc.font('bold').fontSize(9).fillColor(INK).text(T(`${q.className} (${q.classKey}) · version ${q.version}`), MARGIN.left, y, { width: CONTENT_W });
		doc.font('sans').fontSize(8.5).fillColor(SOFT).text(T(targetsInWords(q.targets)), { width: CONTENT_W });
		doc.moveDown(0.35);
	}
	const stale = r.loops.filter((l) => l.requirement && !r.requirements.some((q) => q.requirementId === l.requirement!.id));
	if (stale.length) {
		doc.font('sans').fontSize(8.5).fillColor(SOFT).text(
			`${stale.length} loop(s) were last judged against an older version; their rows name the version used.`,
			{ width: CONTENT_W }
		);
	}
	doc.moveDown(1);
	const y = doc.y;
	doc.rect(MARGIN.left, y, CONTENT_W, 46).lineWidth(0.8).stroke(LINE);
	doc.font('bold').fontSize(9).fillColor(INK).text('Caution', MARGIN.left + 10, y + 8);
	doc.font('sans').fontSize(8.5).fillColor(SOFT).text(CAUTION, MARGIN.left + 10, y + 20, { width: CONTENT_W - 20 });
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
	doc.rect(MARGIN.left, y, CONTENT_W, 22).fill('#eef1f5');
	let x = MARGIN.left;
	for (const c of ALL_COLS) {
		doc.font('bold').fontSize(7).fillColor(SOFT).text(c.title, x + 3, y + 3, { width: c.w - 6, height: 18 });
		x += c.w;
	}
	doc.y = y + 22;
}

function cellCriterion(c: CriterionResult | undefined): { top: string; bottom: string; fail: boolean } {
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
				.map((c) => `${CRITERION_LABELS[c.criterion]} ${actualText(c)} (${requiredText(c)}) ${STATUS_WORDS[c.status]}`)
				.join('; '),
			bottom: l.activeDeviations ? `${l.activeDeviations} active deviation(s)` : ''
		}
	];
	doc.fontSize(7);
	const heights = texts.map((t, i) => {
		const w = ALL_COLS[i].w - 6;
		doc.font(t.fail ? 'bold' : 'sans');
		const top = t.top ? doc.heightOfString(T(t.top), { width: w }) : 0;
		doc.font('sans');
		const bottom = t.bottom ? doc.heightOfString(T(t.bottom), { width: w }) : 0;
		return top + bottom;
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
			doc.font(t.fail ? 'bold' : 'sans').fontSize(7).fillColor(t.fail ? VERDICT_INK.noncompliant : INK);
			doc.text(T(t.top), x + 3, y + ROW_PAD, { width: w });
			if (t.bottom) doc.font('sans').fontSize(7).fillColor(FAINT).text(T(t.bottom), x + 3, doc.y, { width: w });
		}
		x += ALL_COLS[i].w;
	});
	doc.moveTo(MARGIN.left, y + h).lineTo(MARGIN.left + CONTENT_W, y + h).lineWidth(0.4).stroke(LINE);
	doc.y = y + h;
	doc.x = MARGIN.left;
}

function loopTable(doc: Doc, loops: ReportLoop[]) {
	doc.addPage();
	heading(doc, 'Every loop: targets against actuals');
	doc.font('sans').fontSize(8).fillColor(SOFT).text(
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
		doc.font('bold').fontSize(7.5).fillColor(SOFT).text(c.t, x + 3, y + 4, { width: c.w - 6, lineBreak: false });
		x += c.w;
	}
	y += 14;
	const rows = [...criteria].sort((a, b) => Number(b.status === 'fail') - Number(a.status === 'fail'));
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
			doc.font(fail ? 'bold' : 'sans').fontSize(8).fillColor(fail ? VERDICT_INK.noncompliant : INK);
			doc.text(T(v), x + 3, y + 3, { width: cols[i].w - 6, lineBreak: false, ellipsis: true });
			x += cols[i].w;
		});
		y += 15;
		doc.moveTo(MARGIN.left, y).lineTo(MARGIN.left + CONTENT_W, y).lineWidth(0.4).stroke(LINE);
	}
	doc.y = y + 8;
	doc.x = MARGIN.left;
}

function drawFrame(doc: Doc, f: PlotFrame, x: number, y: number, title: string, axes: { x: string; y: string }) {
	doc.font('bold').fontSize(8).fillColor(INK).text(title, x, y - 12, { lineBreak: false });
	doc.save().translate(x, y);
	doc.rect(0, 0, f.width, f.height).lineWidth(0.6).stroke(LINE);
	doc.font('sans').fontSize(6.5).fillColor(FAINT);
	for (const t of f.xTicks) {
		doc.moveTo(t.at, 0).lineTo(t.at, f.height).lineWidth(0.25).stroke('#e3e7ed');
		doc.text(t.label, t.at - 15, f.height + 2, { width: 30, align: 'center', lineBreak: false });
	}
	for (const t of f.yTicks) {
		doc.moveTo(0, t.at).lineTo(f.width, t.at).lineWidth(0.25).stroke('#e3e7ed');
		doc.text(t.label, -34, t.at - 3, { width: 31, align: 'right', lineBreak: false });
	}
	doc.save().rect(0, 0, f.width, f.height).clip();
	for (const g of f.guides) doc.path(g).lineWidth(0.6).dash(2, { space: 2 }).stroke(SOFT);
	doc.undash();
	f.curves.forEach((c, i) => {
		const dash = CASE_DASH[i % CASE_DASH.length];
		if (!c.d) return;
		doc.path(c.d).lineWidth(1.1);
		if (dash) doc.dash(dash[0], { space: dash[1] });
		doc.stroke(CASE_INK[i % CASE_INK.length]);
		doc.undash();
	});
	for (const m of f.marks) {
		doc.path(`M${m.x - 3},${m.y - 3}L${m.x + 3},${m.y + 3}M${m.x - 3},${m.y + 3}L${m.x + 3},${m.y - 3}`).lineWidth(1.2).stroke(VERDICT_INK.noncompliant);
		doc.font('bold').fontSize(7).fillColor(VERDICT_INK.noncompliant).text(m.label, m.x + 4, m.y + 2, { lineBreak: false });
	}
	doc.restore();
	doc.font('sans').fontSize(6.5).fillColor(SOFT).text(axes.x, 0, f.height + 10, { width: f.width, align: 'center', lineBreak: false });
	doc.save().rotate(-90, { origin: [-30, f.height / 2] });
	doc.text(axes.y, -30 - f.height / 2, f.height / 2 - 10, { width: f.height, align: 'center', lineBreak: false });
	doc.restore();
	doc.restore();
}

function legend(doc: Doc, cases: CaseResponse[], x: number, y: number) {
	cases.slice(0, CASE_DASH.length).forEach((c, i) => {
		const yy = y + i * 11;
		doc.moveTo(x, yy + 4).lineTo(x + 18, yy + 4).lineWidth(1.1);
		const dash = CASE_DASH[i];
		if (dash) doc.dash(dash[0], { space: dash[1] });
		doc.stroke(CASE_INK[i]);
		doc.undash();
		doc.font('sans').fontSize(7).fillColor(INK).text(T(c.name), x + 22, yy, { width: 140, lineBreak: false, ellipsis: true });
	});
	if (cases.length > CASE_DASH.length) {
		doc.font('sans').fontSize(7).fillColor(SOFT).text(`… and ${cases.length - CASE_DASH.length} more case(s), not drawn`, x, y + CASE_DASH.length * 11, { lineBreak: false });
	}
}

function loopPage(doc: Doc, l: ReportLoop, cases: CaseResponse[] | undefined) {
	doc.addPage();
	doc.font('sans').fontSize(8).fillColor(SOFT).text(T(`${l.product.name} (${l.product.key})`), MARGIN.left, MARGIN.top);
	heading(doc, `${l.product.key} / ${l.key} — ${l.name}`, 15);
	verdictLabel(doc, l.verdict, MARGIN.left, doc.y, 10);
	doc.y += 16;
	doc.x = MARGIN.left;
	keyValue(doc, [
		['Class', `${l.class.name} (${l.class.key})${l.requirement ? `, judged against version ${l.requirement.version}` : ''}`],
		['Owner', `${l.owner.name} <${l.owner.email}>`],
		['Revision', l.revision ? `${l.revision.number} · ${l.revision.fileName}` : '—'],
		['sha-256', l.revision?.sha256 ?? '—', 'mono'],
		['Judged', when(l.judgedAt)]
	], 80);
	doc.moveDown(0.4);
	heading(doc, l.verdict === 'unstable' ? 'Criteria (the closed loop is unstable)' : 'Failing criteria first', 10);
	if (l.criteria.length) criteriaTable(doc, l.criteria);
	else doc.font('sans').fontSize(8).fillColor(SOFT).text('No criteria were judged.').moveDown(0.5);
	if (!cases?.length) {
		doc.font('sans').fontSize(9).fillColor(SOFT).text('No plot: the judged revision has no sampled response.', MARGIN.left, doc.y + 6);
		return;
	}
	const plotX = MARGIN.left + 38;
	const plotW = CONTENT_W - 38;
	const avail = BOTTOM - doc.y - 40;
	// Bode magnitude and phase stacked, the Nyquist plot beside the legend below.
	const bodeH = Math.max(70, Math.min(120, (avail - 40) * 0.28));
	const nyq = Math.max(120, Math.min(220, avail - 2 * bodeH - 70));
	const { magnitude, phase } = bodeFrames(cases, plotW, bodeH);
	let y = doc.y + 16;
	drawFrame(doc, magnitude, plotX, y, 'Bode magnitude', { x: 'frequency (Hz)', y: 'dB' });
	y += bodeH + 34;
	drawFrame(doc, phase, plotX, y, 'Bode phase', { x: 'frequency (Hz)', y: 'degrees' });
	y += bodeH + 34;
	drawFrame(doc, nyquistFrame(cases, nyq), plotX, y, 'Nyquist (both frequency signs)', { x: 'real', y: 'imaginary' });
	legend(doc, cases, plotX + nyq + 30, y);
	doc.y = y + nyq + 20;
}

function footers(doc: Doc, r: ReportData) {
	const range = doc.bufferedPageRange();
	for (let i = range.start; i < range.start + range.count; i++) {
		doc.switchToPage(i);
		// Writing below the bottom margin would start a new page: lift it while drawing the footer.
		const saved = doc.page.margins.bottom;
		doc.page.margins.bottom = 0;
		const y = PAGE_H - MARGIN.bottom + 18;
		doc.moveTo(MARGIN.left, y - 6).lineTo(PAGE_W - MARGIN.right, y - 6).lineWidth(0.4).stroke(LINE);
		doc.font('sans').fontSize(7).fillColor(FAINT);
		doc.text(`Headroom compliance report ${r.id.slice(0, 8)} · ${when(r.generatedAt)}`, MARGIN.left, y, { width: CONTENT_W - 90, lineBreak: false });
		doc.text(`page ${i + 1} of ${range.count}`, PAGE_W - MARGIN.right - 90, y, { width: 90, align: 'right', lineBreak: false });
		doc.text(CAUTION_SHORT, MARGIN.left, y + 10, { width: CONTENT_W, lineBreak: false });
		doc.page.margins.bottom = saved;
	}
}

export async function renderPdf({ report, responses }: PdfInput): Promise<Uint8Array> {
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
	for (const l of report.loops.filter(needsPlotPage)) loopPage(doc, l, responses.get(l.id));
	footers(doc, report);
	doc.end();
	await done;
	return new Uint8Array(Buffer.concat(chunks));
}
