/**
 * Bode plot geometry: pure numbers and SVG path strings, no DOM.
 *
 *   bodeGeometry(responses, margins, { width, height }) → BodeGeometry
 *
 * - `responses`: the engine's `sampleResponse(model)` (one CaseResponse per operating case; the
 *   phase is already unwrapped). `margins`: the engine's `computeMargins(model)` for the same
 *   model and gain scale, or null to draw curves only. Cases are matched by index (both come from
 *   the same model, in the same order).
 * - Two panels share one log-frequency x axis: magnitude (dB) on top, phase (deg) below.
 * - Every curve is clipped to its panel (`magnitudePanel` / `phasePanel` rects), so the path data
 *   needs no clip path to draw correctly; drawing it with pdfkit is `doc.path(d).stroke()`.
 * - Gain crossovers are marked on the 0 dB line, phase crossovers on the −180° + k·360° line the
 *   phase curve crosses there. Dimension lines: gain margin at each phase crossover from the
 *   magnitude curve to 0 dB; phase margin at each gain crossover from the phase curve to the
 *   critical line (phase − PM, which is −180° + k·360° for the unwrapped phase).
 * - All coordinates are pixels in a box of `width` × `height` with the origin top left.
 *
 * Stable interface: the PDF reports draw from it too. Add fields; do not rename or remove.
 */
import { scaleLinear, scaleLog } from 'd3-scale';
import type { CaseResponse, ResponsePoint } from '../margins/sampler';
import type { MarginsResult } from '../margins/types';
import { clipPolyline, polylinesPath, segmentPath, type Pt, type Rect } from './path';
import {
	formatHz,
	formatNumber,
	logTicks,
	niceDomain,
	pickStep,
	stepTicks,
	type Tick
} from './ticks';

export interface Insets {
	top: number;
	right: number;
	bottom: number;
	left: number;
}

export interface BodeOptions {
	width: number;
	height: number;
	/** Space for tick labels around the panels; defaults suit 11–12 px text. */
	insets?: Partial<Insets>;
	/** Vertical space between the two panels (px). */
	gap?: number;
	/** Share of the panel height given to magnitude (0.2–0.8, default 0.5). */
	split?: number;
	/** Fix the axes instead of fitting them to the data (e.g. to keep them still under a slider). */
	hzDomain?: [number, number];
	magnitudeDomainDb?: [number, number];
	phaseDomainDeg?: [number, number];
	/** Largest magnitude span shown when fitting (dB, default 160) — deep notches get clipped. */
	maxMagnitudeSpanDb?: number;
	/** Largest phase span shown when fitting (deg, default 540) — the roll-off far past the crossovers gets clipped, the top kept. */
	maxPhaseSpanDeg?: number;
}

export interface Axis {
	domain: [number, number];
	/** Pixel range, [start, end] (y axes run bottom → top, so start > end). */
	range: [number, number];
	ticks: Tick[];
	toPx: (v: number) => number;
	fromPx: (px: number) => number;
}

export interface BodeCurve {
	name: string;
	index: number;
	magnitudePath: string;
	phasePath: string;
	measuredOnly: boolean;
	nyquistHz?: number;
}

export interface GainCrossoverMarker {
	caseName: string;
	caseIndex: number;
	hz: number;
	phaseMarginDeg: number;
	x: number;
	/** On the 0 dB line of the magnitude panel. */
	y: number;
	/** Where the phase curve is at this frequency (phase panel; clamped into the panel). */
	phaseY: number;
	label: string;
	/** False when the marker's point lies outside its panel (its y was pulled onto the edge). */
	inside: boolean;
}

export interface PhaseCrossoverMarker {
	caseName: string;
	caseIndex: number;
	hz: number;
	gainMarginDb: number;
	/** The critical line this crossover lies on: −180 + k·360. */
	criticalDeg: number;
	x: number;
	/** On the critical line of the phase panel (clamped into the panel). */
	y: number;
	/** Where the magnitude curve is at this frequency (clamped into the magnitude panel). */
	magnitudeY: number;
	label: string;
	/** False when the critical line lies outside the phase domain (y pulled onto the edge). */
	inside: boolean;
}

export interface DimensionLine {
	kind: 'gain-margin' | 'phase-margin';
	caseName: string;
	caseIndex: number;
	hz: number;
	/** The margin, dB or deg, sign kept. */
	value: number;
	x: number;
	/** From the curve … */
	y1: number;
	/** … to the reference line (0 dB, or the critical phase line). */
	y2: number;
	/** The line with end ticks. */
	path: string;
	label: string;
	labelX: number;
	labelY: number;
	/** Text anchor for the label: 'start' right of the line, 'end' left of it. */
	labelAnchor: 'start' | 'end';
	/** True when an end fell outside its panel and was pulled onto the edge. */
	clipped: boolean;
	/**
	 * True for the crossover the case's reported margin comes from (upper or lower gain margin,
	 * phase margin); the others are drawn too, and a crowded plot may leave their labels out.
	 */
	primary: boolean;
}

export interface ReferenceLine {
	value: number;
	y: number;
	path: string;
	label: string;
}

export interface BodeGeometry {
	width: number;
	height: number;
	magnitudePanel: Rect;
	phasePanel: Rect;
	x: Axis;
	magnitude: Axis;
	phase: Axis;
	curves: BodeCurve[];
	/** The 0 dB line (always inside the magnitude domain). */
	zeroDb: ReferenceLine;
	/** Every −180° + k·360° line inside the phase domain. */
	criticalLines: ReferenceLine[];
	/** Vertical lines at the Nyquist frequency of sampled cases (both panels). */
	nyquistLines: { hz: number; x: number; path: string; label: string }[];
	gainCrossovers: GainCrossoverMarker[];
	phaseCrossovers: PhaseCrossoverMarker[];
	gainMarginLines: DimensionLine[];
	phaseMarginLines: DimensionLine[];
}

const DEFAULT_INSETS: Insets = { top: 10, right: 14, bottom: 34, left: 58 };

/** Index of the point nearest to `hz` in log frequency (points ascending in hz). */
export function nearestIndex(points: readonly ResponsePoint[], hz: number): number {
	if (points.length === 0) return -1;
	let lo = 0;
	let hi = points.length - 1;
	while (hi - lo > 1) {
		const mid = (lo + hi) >> 1;
		if (points[mid].hz < hz) lo = mid;
		else hi = mid;
	}
	const dl = Math.abs(Math.log(hz / points[lo].hz));
	const dh = Math.abs(Math.log(hz / points[hi].hz));
	return dh < dl ? hi : lo;
}

/** A response value interpolated linearly in log frequency; NaN outside the sampled band. */
export function valueAt(
	points: readonly ResponsePoint[],
	hz: number,
	key: 'magnitudeDb' | 'phaseDeg'
): number {
	const n = points.length;
	if (n === 0 || hz < points[0].hz || hz > points[n - 1].hz) return NaN;
	let lo = 0;
	let hi = n - 1;
	while (hi - lo > 1) {
		const mid = (lo + hi) >> 1;
		if (points[mid].hz <= hz) lo = mid;
		else hi = mid;
	}
	const a = points[lo];
	const b = points[hi];
	if (a.hz === hz || lo === hi) return a[key];
	if (b.hz === hz) return b[key];
	const t = Math.log(hz / a.hz) / Math.log(b.hz / a.hz);
	return a[key] + (b[key] - a[key]) * t;
}

const finite = (vs: number[]) => vs.filter(Number.isFinite);
const clamp = (v: number, a: number, b: number) =>
	Math.min(Math.max(v, Math.min(a, b)), Math.max(a, b));

function extent(vs: number[]): [number, number] | null {
	const f = finite(vs);
	if (!f.length) return null;
	let lo = f[0];
	let hi = f[0];
	for (const v of f) {
		if (v < lo) lo = v;
		if (v > hi) hi = v;
	}
	return [lo, hi];
}

/**
 * Fit a domain to the data and the values that must show (reference lines, margin ends), keeping
 * the span under `cap` by dropping data far from what must show.
 */
function fitDomain(data: number[], must: number[], cap: number, pad: number): [number, number] {
	const d = extent(data) ?? extent(must) ?? [-1, 1];
	const m = extent(must) ?? d;
	let lo = Math.min(d[0], m[0] - pad);
	let hi = Math.max(d[1], m[1] + pad);
	if (hi - lo > cap) {
		// keep everything that must show, then as much data above it as fits
		hi = Math.min(hi, Math.max(m[1] + pad, m[0] - pad + cap));
		lo = Math.max(lo, hi - cap);
	}
	return [lo, hi];
}

/** The critical line −180 + k·360 nearest to `deg`. */
export function criticalLineNear(deg: number): number {
	return -180 + 360 * Math.round((deg + 180) / 360);
}

function axis(
	scale: { (v: number): number; invert(px: number): number },
	domain: [number, number],
	range: [number, number],
	ticks: (toPx: (v: number) => number) => Tick[]
): Axis {
	const toPx = (v: number) => scale(v);
	return { domain, range, toPx, fromPx: (px) => scale.invert(px), ticks: ticks(toPx) };
}

export function bodeGeometry(
	responses: readonly CaseResponse[],
	margins: MarginsResult | null,
	options: BodeOptions
): BodeGeometry {
	const ins = { ...DEFAULT_INSETS, ...options.insets };
	const width = Math.max(80, options.width);
	const height = Math.max(80, options.height);
	const gap = options.gap ?? 26;
	const split = clamp(options.split ?? 0.5, 0.2, 0.8);
	const inner = Math.max(20, height - ins.top - ins.bottom - gap);
	const left = ins.left;
	const right = Math.max(left + 20, width - ins.right);
	const magnitudePanel: Rect = { left, right, top: ins.top, bottom: ins.top + inner * split };
	const phasePanel: Rect = {
		left,
		right,
		top: magnitudePanel.bottom + gap,
		bottom: height - ins.bottom
	};

	const all = responses.flatMap((r) => r.points);
	const cases = margins?.cases ?? [];

	// x: the sampled band, exactly (the engine already spans two decades past every feature)
	const hzExt = extent(all.map((p) => p.hz).filter((h) => h > 0)) ?? [1, 1000];
	let hzDomain: [number, number] = options.hzDomain ?? hzExt;
	if (!(hzDomain[1] > hzDomain[0])) hzDomain = [hzDomain[0] / 10, hzDomain[0] * 10];
	const xScale = scaleLog().domain(hzDomain).range([left, right]);
	const maxLabels = Math.max(2, Math.floor((right - left) / 64));
	const x = axis(xScale, hzDomain, [left, right], (toPx) => logTicks(hzDomain, toPx, maxLabels));

	// margin ends that must show on the y axes
	const phaseEnds: number[] = [];
	cases.forEach((c, i) => {
		const pts = responses[i]?.points ?? [];
		for (const g of c.gainCrossovers) {
			const ph = valueAt(pts, g.hz, 'phaseDeg');
			if (Number.isFinite(ph)) phaseEnds.push(ph, criticalLineNear(ph - g.phaseMarginDeg));
		}
		for (const p of c.phaseCrossovers) {
			const ph = valueAt(pts, p.hz, 'phaseDeg');
			if (Number.isFinite(ph)) phaseEnds.push(criticalLineNear(ph));
		}
	});
	const gmEnds = cases
		.flatMap((c) => c.phaseCrossovers.map((p) => -p.gainMarginDb))
		.filter(Number.isFinite);

	const magDomain =
		options.magnitudeDomainDb ??
		(() => {
			const [lo, hi] = fitDomain(
				all.map((p) => p.magnitudeDb),
				[0, ...gmEnds],
				options.maxMagnitudeSpanDb ?? 160,
				6
			);
			const step = pickStep(hi - lo, [10, 20, 40, 50, 100], 5);
			return niceDomain(lo, hi, step);
		})();
	const magPanelH = magnitudePanel.bottom - magnitudePanel.top;
	const magStep = pickStep(
		magDomain[1] - magDomain[0],
		[5, 10, 20, 40, 50, 100],
		Math.max(2, Math.floor(magPanelH / 28))
	);
	const magScale = scaleLinear()
		.domain(magDomain)
		.range([magnitudePanel.bottom, magnitudePanel.top]);
	const magnitude = axis(magScale, magDomain, [magnitudePanel.bottom, magnitudePanel.top], (toPx) =>
		stepTicks(magDomain, magStep, toPx, 'dB')
	);

	const phDomain =
		options.phaseDomainDeg ??
		(() => {
			const cap = options.maxPhaseSpanDeg ?? 540;
			const [lo, hi] = fitDomain(
				all.map((p) => p.phaseDeg),
				phaseEnds,
				cap,
				15
			);
			const step = pickStep(hi - lo, [45, 90, 180, 360], 5);
			return niceDomain(lo, hi, step, Math.max(cap, step));
		})();
	const phPanelH = phasePanel.bottom - phasePanel.top;
	const phStep = pickStep(
		phDomain[1] - phDomain[0],
		[15, 30, 45, 90, 180, 360],
		Math.max(2, Math.floor(phPanelH / 28))
	);
	const phScale = scaleLinear().domain(phDomain).range([phasePanel.bottom, phasePanel.top]);
	const phase = axis(phScale, phDomain, [phasePanel.bottom, phasePanel.top], (toPx) =>
		stepTicks(phDomain, phStep, toPx, '°')
	);

	const curves: BodeCurve[] = responses.map((r, index) => {
		const xs = r.points.map((p) => (p.hz > 0 ? xScale(p.hz) : NaN));
		const mag: Pt[] = r.points.map((p, i) => [xs[i], magScale(p.magnitudeDb)]);
		const ph: Pt[] = r.points.map((p, i) => [xs[i], phScale(p.phaseDeg)]);
		const curve: BodeCurve = {
			name: r.name,
			index,
			magnitudePath: polylinesPath(clipPolyline(mag, magnitudePanel)),
			phasePath: polylinesPath(clipPolyline(ph, phasePanel)),
			measuredOnly: r.measuredOnly
		};
		if (r.nyquistHz !== undefined) curve.nyquistHz = r.nyquistHz;
		return curve;
	});

	const hLine = (y: number, panel: Rect) => segmentPath([panel.left, y], [panel.right, y]);
	const zeroY = magScale(0);
	const zeroDb: ReferenceLine = {
		value: 0,
		y: zeroY,
		path: hLine(zeroY, magnitudePanel),
		label: '0 dB'
	};
	const criticalLines: ReferenceLine[] = [];
	for (let k = Math.ceil((phDomain[0] + 180) / 360); -180 + 360 * k <= phDomain[1]; k++) {
		const deg = -180 + 360 * k;
		const y = phScale(deg);
		criticalLines.push({
			value: deg,
			y,
			path: hLine(y, phasePanel),
			label: `${formatNumber(deg, 5)}°`
		});
	}

	const nyquistLines = [
		...new Set(responses.map((r) => r.nyquistHz).filter((h): h is number => h !== undefined))
	]
		.filter((hz) => hz >= hzDomain[0] && hz <= hzDomain[1])
		.map((hz) => {
			const px = xScale(hz);
			return {
				hz,
				x: px,
				path:
					segmentPath([px, magnitudePanel.top], [px, magnitudePanel.bottom]) +
					segmentPath([px, phasePanel.top], [px, phasePanel.bottom]),
				label: `Nyquist ${formatHz(hz)}`
			};
		});

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

	return {
		width,
		height,
		magnitudePanel,
		phasePanel,
		x,
		magnitude,
		phase,
		curves,
		zeroDb,
		criticalLines,
		nyquistLines,
		gainCrossovers,
		phaseCrossovers,
		gainMarginLines,
		phaseMarginLines
	};
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
