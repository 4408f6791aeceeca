/**
 * A page per non-compliant or unstable loop: what was judged, the criteria with the failing ones
 * first, then the Bode plot across the page and the Nyquist plot beside the case legend and the
 * region the targets rule out.
 */
import type { CriterionResult } from '../../compliance/judge';
import { CRITERION_LABELS } from '../../compliance/criteria';
import type { CaseResponse, MarginsResult } from '../../margins';
import type { ReportLoop } from '../../reports/types';
import { actualText, requiredText, shortfallText, STATUS_WORDS } from '../../reports/words';
import {
	BOTTOM,
	CONTENT_W,
	heading,
	INK,
	keyValue,
	LINE,
	MARGIN,
	SOFT,
	T,
	when,
	type Doc
} from './pdf-layout';
import { CASE_DASH, CASE_INK, drawBode, drawNyquist } from './pdf-plots';
import { flow, put } from './pdf-text';
import { VERDICT_INK, verdictLabel } from './pdf-verdict';

export interface LoopPlot {
	cases: CaseResponse[];
	margins: MarginsResult | null;
}

/** Loops that get a page of their own. */
export const needsPlotPage = (l: Pick<ReportLoop, 'verdict'>) =>
	l.verdict === 'noncompliant' || l.verdict === 'unstable';

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

export function loopPage(doc: Doc, l: ReportLoop, plot: LoopPlot | undefined) {
	doc.addPage();
	doc.font('sans').fontSize(8).fillColor(SOFT);
	flow(doc, T(`${l.product.name} (${l.product.key})`), MARGIN.left, MARGIN.top, CONTENT_W);
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
		doc.font('sans').fontSize(7).fillColor(SOFT);
		flow(doc, T(forbidden.join('\n')), lx, doc.y + 2, CONTENT_W - nyq - 16);
	}
	doc.y = y + nyq + 4;
	doc.x = MARGIN.left;
}
