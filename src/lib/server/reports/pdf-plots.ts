/**
 * Bode and Nyquist plots on a PDF page, drawn from the shared plot geometry (src/lib/plots): the
 * same path strings the loop page draws in SVG, stroked here with doc.path(d). Cases differ by
 * dash pattern as well as shade, so the plots read in greyscale.
 */
import type { Targets } from '../../compliance/criteria';
import type { CaseResponse, MarginsResult } from '../../margins';
import {
	bodeGeometry,
	drawnMarginLines,
	labelledLines,
	nyquistGeometry,
	type Axis,
	type Rect
} from '../../plots';
import { pdfSafe } from '../../reports/words';
import { put } from './pdf-text';

type Doc = PDFKit.PDFDocument;

const GRID = '#e3e7ed';
const FRAME = '#c9d0da';
const REF = '#4a5565';
const LABEL = '#7a8494';
const MARK = '#a3261b';
const FORBIDDEN = '#f3d9d6';
export const CASE_DASH: (number[] | null)[] = [null, [4, 2], [1.2, 1.6], [6, 2, 1.2, 2]];
export const CASE_INK = ['#1f5f8b', '#a3261b', '#1d6b3a', '#7b1f6a'];
const INSETS = { top: 4, right: 8, bottom: 20, left: 38 };

function caseStroke(doc: Doc, d: string, i: number, width = 1.1) {
	if (!d) return;
	const dash = CASE_DASH[i % CASE_DASH.length];
	doc.path(d).lineWidth(width);
	if (dash) doc.dash(dash[0], { space: dash[1] });
	doc.stroke(CASE_INK[i % CASE_INK.length]);
	doc.undash();
}

function dashed(doc: Doc, d: string, color = REF, width = 0.6) {
	if (!d) return;
	doc.path(d).lineWidth(width).dash(2, { space: 2 }).stroke(color);
	doc.undash();
}

function small(
	doc: Doc,
	text: string,
	x: number,
	y: number,
	width: number,
	align: 'left' | 'center' | 'right' = 'left',
	color = LABEL
) {
	doc.font('sans').fontSize(6.5).fillColor(color);
	put(doc, pdfSafe(text), x, y, { width, align });
}

function xAxis(doc: Doc, axis: Axis, panel: Rect, labels: boolean) {
	for (const t of axis.ticks) {
		doc
			.moveTo(t.position, panel.top)
			.lineTo(t.position, panel.bottom)
			.lineWidth(t.major ? 0.35 : 0.2)
			.stroke(GRID);
		if (labels && t.label) small(doc, t.label, t.position - 20, panel.bottom + 2, 40, 'center');
	}
}

function yAxis(doc: Doc, axis: Axis, panel: Rect) {
	for (const t of axis.ticks) {
		doc
			.moveTo(panel.left, t.position)
			.lineTo(panel.right, t.position)
			.lineWidth(t.major ? 0.35 : 0.2)
			.stroke(GRID);
		if (t.label) small(doc, t.label, panel.left - 36, t.position - 3, 33, 'right');
	}
}

const frame = (doc: Doc, r: Rect) =>
	doc
		.rect(r.left, r.top, r.right - r.left, r.bottom - r.top)
		.lineWidth(0.6)
		.stroke(FRAME);

/** Magnitude over phase, with 0 dB, the critical lines and the margins as dimension lines. */
export function drawBode(
	doc: Doc,
	cases: CaseResponse[],
	margins: MarginsResult | null,
	x: number,
	y: number,
	width: number,
	height: number
) {
	const g = bodeGeometry(cases, margins, { width, height, insets: INSETS, gap: 22 });
	doc.save().translate(x, y);
	for (const [panel, axis, title] of [
		[g.magnitudePanel, g.magnitude, 'Magnitude'],
		[g.phasePanel, g.phase, 'Phase']
	] as const) {
		xAxis(doc, g.x, panel, true);
		yAxis(doc, axis, panel);
		frame(doc, panel);
		doc.font('bold').fontSize(7.5).fillColor('#1b2330');
		put(doc, title, panel.left + 4, panel.top + 3);
	}
	dashed(doc, g.zeroDb.path);
	for (const c of g.criticalLines) dashed(doc, c.path);
	for (const n of g.nyquistLines) dashed(doc, n.path, LABEL);
	g.curves.forEach((c) => {
		caseStroke(doc, c.magnitudePath, c.index);
		caseStroke(doc, c.phasePath, c.index);
	});
	// As on the loop page: every margin line while there are few, only the reported ones in a crowd,
	// and a label only where it does not overwrite another (labels are ~4 pt per character here).
	const drawn = [...drawnMarginLines(g.gainMarginLines), ...drawnMarginLines(g.phaseMarginLines)];
	for (const m of drawn)
		doc
			.path(m.path)
			.lineWidth(m.primary ? 0.9 : 0.6)
			.stroke(MARK);
	for (const m of labelledLines(drawn, 4, 9)) {
		const w = 60;
		const lx = m.labelAnchor === 'end' ? m.labelX - w - 2 : m.labelX + 2;
		small(doc, m.label, lx, m.labelY - 3, w, m.labelAnchor === 'end' ? 'right' : 'left', MARK);
	}
	for (const c of [...g.gainCrossovers, ...g.phaseCrossovers].filter((m) => m.inside))
		doc.circle(c.x, c.y, 1.8).fill(MARK);
	small(
		doc,
		'frequency (Hz)',
		g.phasePanel.left,
		g.phasePanel.bottom + 11,
		g.phasePanel.right - g.phasePanel.left,
		'center'
	);
	small(doc, 'dB', g.magnitudePanel.left - 36, g.magnitudePanel.top + 8, 14, 'left');
	small(doc, 'deg', g.phasePanel.left - 36, g.phasePanel.top + 8, 14, 'left');
	doc.restore();
}

/** The Nyquist curve (both frequency signs), −1, the unit circle and what the targets forbid. */
export function drawNyquist(
	doc: Doc,
	cases: CaseResponse[],
	margins: MarginsResult | null,
	targets: Targets | null,
	x: number,
	y: number,
	size: number
) {
	const g = nyquistGeometry(cases, margins, { width: size, height: size, insets: INSETS, targets });
	doc.save().translate(x, y);
	xAxis(doc, g.x, g.frame, true);
	yAxis(doc, g.y, g.frame);
	if (g.forbidden.disc) doc.path(g.forbidden.disc.path).fill(FORBIDDEN);
	if (g.forbidden.diskMarginDisc)
		doc.path(g.forbidden.diskMarginDisc.path).fillOpacity(0.6).fill(FORBIDDEN).fillOpacity(1);
	for (const s of g.forbidden.gainSegments) doc.path(s.path).lineWidth(3).stroke(FORBIDDEN);
	if (g.forbidden.phaseArc) doc.path(g.forbidden.phaseArc.path).lineWidth(3).stroke(FORBIDDEN);
	frame(doc, g.frame);
	doc.path(g.axesPath).lineWidth(0.5).stroke(REF);
	dashed(doc, g.unitCircle);
	g.curves.forEach((c) => {
		caseStroke(doc, c.path, c.index);
		caseStroke(doc, c.mirrorPath, c.index, 0.5);
		if (c.arrowsPath) doc.path(c.arrowsPath).fill(CASE_INK[c.index % CASE_INK.length]);
	});
	for (const m of g.modulusCircles.filter((m) => m.worst)) {
		dashed(doc, m.path, MARK, 0.7);
		if (m.radiusPath) doc.path(m.radiusPath).lineWidth(0.7).stroke(MARK);
		if (m.nearest) small(doc, m.label, m.nearest.x + 3, m.nearest.y + 2, 80, 'left', MARK);
	}
	doc.path(g.criticalPoint.path).lineWidth(1.2).stroke(MARK);
	small(doc, g.criticalPoint.label, g.criticalPoint.x + 4, g.criticalPoint.y + 2, 20, 'left', MARK);
	small(doc, 'real', g.frame.left, g.frame.bottom + 11, g.frame.right - g.frame.left, 'center');
	small(doc, 'imag', g.frame.left - 36, g.frame.top + 2, 20, 'left');
	doc.restore();
	return g.forbidden.description;
}
