/**
 * The margins on a Bode plot: gain crossovers marked on the 0 dB line, phase crossovers on the
 * −180° + k·360° line the phase curve crosses there, and dimension lines — the gain margin at
 * each phase crossover from the magnitude curve to 0 dB, the phase margin at each gain crossover
 * from the phase curve to the critical line (phase − PM). Also which of those lines a crowded
 * plot draws and labels.
 */
import type { CaseResponse } from '../margins/sampler';
import type { MarginsResult } from '../margins/types';
import { clamp } from './axis';
import type { BodeFrame } from './bode-frame';
import type {
	BodeGeometry,
	DimensionLine,
	GainCrossoverMarker,
	PhaseCrossoverMarker
} from './bode-types';
import { segmentPath, type Rect } from './path';
import { criticalLineNear, valueAt } from './response';
import { formatHz, formatNumber } from './ticks';

export type BodeMarkers = Pick<
	BodeGeometry,
	'gainCrossovers' | 'phaseCrossovers' | 'gainMarginLines' | 'phaseMarginLines'
>;

export function bodeMarkers(
	responses: readonly CaseResponse[],
	margins: MarginsResult | null,
	{ magnitudePanel, phasePanel, x, magnitude, phase }: BodeFrame
): BodeMarkers {
	const cases = margins?.cases ?? [];
	const hzDomain = x.domain;
	const xScale = x.toPx;
	const magScale = magnitude.toPx;
	const phScale = phase.toPx;
	const zeroY = magScale(0);
	const inMag = (y: number) => clamp(y, magnitudePanel.top, magnitudePanel.bottom);
	const inPh = (y: number) => clamp(y, phasePanel.top, phasePanel.bottom);
	const inX = (hz: number) => hz >= hzDomain[0] && hz <= hzDomain[1];

	const gainCrossovers: GainCrossoverMarker[] = [];
	const phaseCrossovers: PhaseCrossoverMarker[] = [];
	const gainMarginLines: DimensionLine[] = [];
	const phaseMarginLines: DimensionLine[] = [];

	cases.forEach((c, caseIndex) => {
		const pts = responses[caseIndex]?.points ?? [];
		for (const g of c.gainCrossovers) {
			if (!inX(g.hz)) continue;
			const px = xScale(g.hz);
			const ph = valueAt(pts, g.hz, 'phaseDeg');
			const phaseY = Number.isFinite(ph) ? phScale(ph) : NaN;
			gainCrossovers.push({
				caseName: c.name,
				caseIndex,
				hz: g.hz,
				phaseMarginDeg: g.phaseMarginDeg,
				x: px,
				y: zeroY,
				phaseY: inPh(phaseY),
				label: formatHz(g.hz),
				inside: zeroY >= magnitudePanel.top && zeroY <= magnitudePanel.bottom
			});
			if (!Number.isFinite(ph)) continue;
			const ref = criticalLineNear(ph - g.phaseMarginDeg);
			phaseMarginLines.push(
				dimension(
					'phase-margin',
					c.name,
					caseIndex,
					g.hz,
					g.phaseMarginDeg,
					px,
					phaseY,
					phScale(ref),
					phasePanel,
					`PM ${formatNumber(g.phaseMarginDeg, 3)}°`,
					g.hz === c.phaseMarginHz
				)
			);
		}
		for (const p of c.phaseCrossovers) {
			if (!inX(p.hz)) continue;
			const px = xScale(p.hz);
			const ph = valueAt(pts, p.hz, 'phaseDeg');
			const criticalDeg = criticalLineNear(Number.isFinite(ph) ? ph : -180);
			const magY = magScale(-p.gainMarginDb);
			const critY = phScale(criticalDeg);
			phaseCrossovers.push({
				caseName: c.name,
				caseIndex,
				hz: p.hz,
				gainMarginDb: p.gainMarginDb,
				criticalDeg,
				x: px,
				y: inPh(critY),
				magnitudeY: inMag(magY),
				label: formatHz(p.hz),
				inside: critY >= phasePanel.top && critY <= phasePanel.bottom
			});
			gainMarginLines.push(
				dimension(
					'gain-margin',
					c.name,
					caseIndex,
					p.hz,
					p.gainMarginDb,
					px,
					magY,
					zeroY,
					magnitudePanel,
					`GM ${formatNumber(p.gainMarginDb, 3)} dB`,
					p.hz === c.upperGainMarginHz || p.hz === c.lowerGainMarginHz
				)
			);
		}
	});

	markNearest(gainMarginLines);
	markNearest(phaseMarginLines);

	return { gainCrossovers, phaseCrossovers, gainMarginLines, phaseMarginLines };
}

/** Every margin line while there are few; in a crowd (long delays, many crossovers) only the reported ones. */
export function drawnMarginLines(lines: readonly DimensionLine[], crowd = 8): DimensionLine[] {
	return lines.length <= crowd ? [...lines] : lines.filter((l) => l.primary);
}

/**
 * The dimension lines whose labels can be written without overlapping one another: primary lines
 * first, smallest margin first among them. Labels are estimated at `charWidth` px per character, `lineHeight` tall.
 */
export function labelledLines(
	lines: readonly DimensionLine[],
	charWidth = 6.2,
	lineHeight = 13
): DimensionLine[] {
	const boxes: { l: number; r: number; t: number; b: number }[] = [];
	const out: DimensionLine[] = [];
	// primary first, and among them the smallest margin (the one the worst case reports)
	const ordered = [...lines].sort(
		(a, b) => Number(b.primary) - Number(a.primary) || Math.abs(a.value) - Math.abs(b.value)
	);
	for (const line of ordered) {
		const w = line.label.length * charWidth;
		const l = line.labelAnchor === 'start' ? line.labelX : line.labelX - w;
		const box = { l, r: l + w, t: line.labelY - lineHeight / 2, b: line.labelY + lineHeight / 2 };
		if (boxes.some((o) => box.l < o.r && box.r > o.l && box.t < o.b && box.b > o.t)) continue;
		boxes.push(box);
		out.push(line);
	}
	return out;
}

/** A case without a reported margin (e.g. unstable) still gets its smallest one as primary. */
function markNearest(lines: DimensionLine[]) {
	const byCase = new Map<number, DimensionLine[]>();
	for (const l of lines) byCase.set(l.caseIndex, [...(byCase.get(l.caseIndex) ?? []), l]);
	for (const group of byCase.values()) {
		if (group.some((l) => l.primary)) continue;
		group.reduce((a, b) => (Math.abs(b.value) < Math.abs(a.value) ? b : a)).primary = true;
	}
}

function dimension(
	kind: DimensionLine['kind'],
	caseName: string,
	caseIndex: number,
	hz: number,
	value: number,
	x: number,
	rawY1: number,
	rawY2: number,
	panel: Rect,
	label: string,
	primary: boolean
): DimensionLine {
	const y1 = clamp(rawY1, panel.top, panel.bottom);
	const y2 = clamp(rawY2, panel.top, panel.bottom);
	const t = 3;
	const path = `${segmentPath([x, y1], [x, y2])}${segmentPath([x - t, y1], [x + t, y1])}${segmentPath([x - t, y2], [x + t, y2])}`;
	// labels go right of the line, unless that runs off the panel
	const flip = x + 6 + 72 > panel.right;
	return {
		kind,
		caseName,
		caseIndex,
		hz,
		value,
		x,
		y1,
		y2,
		path,
		label,
		labelX: flip ? x - 6 : x + 6,
		labelY: (y1 + y2) / 2,
		labelAnchor: flip ? 'end' : 'start',
		clipped: y1 !== rawY1 || y2 !== rawY2,
		primary
	};
}
