/**
 * STOPGAP plot geometry for the PDF, kept apart on purpose: the shared plot geometry module
 * (src/lib/plots, branch `plots`) had not landed when the reports were written. It turns sampled
 * responses into SVG path strings in a box's own coordinates (0..width, 0..height, y down),
 * with d3-scale and d3-shape, which pdfkit draws with doc.path(d). Replace with src/lib/plots
 * when it is merged (the PDF only needs `PlotFrame`).
 */
import { scaleLinear, scaleLog } from 'd3-scale';
import { line } from 'd3-shape';
import type { CaseResponse } from '../../margins';
import { figure } from '../../reports/words';

export interface Tick {
	at: number;
	label: string;
}

export interface PlotFrame {
	width: number;
	height: number;
	curves: { name: string; d: string }[];
	/** Reference lines (0 dB, −180°, the unit circle) drawn thin and dashed. */
	guides: string[];
	xTicks: Tick[];
	yTicks: Tick[];
	/** A labelled point (the critical point −1 on the Nyquist plot). */
	marks: { x: number; y: number; label: string }[];
}

const finite = (n: number) => Number.isFinite(n);

function decadeTicks(lo: number, hi: number, scale: (v: number) => number): Tick[] {
	const out: Tick[] = [];
	for (let e = Math.ceil(Math.log10(lo)); e <= Math.floor(Math.log10(hi)); e++) {
		const v = 10 ** e;
		out.push({ at: scale(v), label: v >= 1000 ? `${v / 1000}k` : figure(v) });
	}
	return out;
}

function linearTicks(scale: ReturnType<typeof scaleLinear<number, number>>, count: number): Tick[] {
	return scale.ticks(count).map((v) => ({ at: scale(v), label: figure(v) }));
}

/** Padded extent of finite values, clamped to a sane span. */
function extent(values: number[], pad: number, minSpan: number, clamp: [number, number]): [number, number] {
	const v = values.filter(finite);
	let lo = v.length ? Math.max(clamp[0], Math.min(...v)) : -1;
	let hi = v.length ? Math.min(clamp[1], Math.max(...v)) : 1;
	if (hi - lo < minSpan) {
		const mid = (hi + lo) / 2;
		lo = mid - minSpan / 2;
		hi = mid + minSpan / 2;
	}
	return [lo - pad * (hi - lo), hi + pad * (hi - lo)];
}

export function bodeFrames(cases: CaseResponse[], width: number, height: number): { magnitude: PlotFrame; phase: PlotFrame } {
	const pts = cases.flatMap((c) => c.points).filter((p) => p.hz > 0 && finite(p.hz));
	const lo = pts.length ? Math.min(...pts.map((p) => p.hz)) : 1;
	const hi = pts.length ? Math.max(...pts.map((p) => p.hz)) : 10;
	const x = scaleLog().domain([lo, hi > lo ? hi : lo * 10]).range([0, width]);
	const mag = scaleLinear().domain(extent(pts.map((p) => p.magnitudeDb), 0.05, 20, [-200, 200])).range([height, 0]).nice();
	const ph = scaleLinear().domain(extent(pts.map((p) => p.phaseDeg), 0.05, 90, [-1080, 360])).range([height, 0]).nice();
	const curve = (y: (p: CaseResponse['points'][number]) => number) =>
		line<CaseResponse['points'][number]>()
			.defined((p) => p.hz > 0 && finite(y(p)))
			.x((p) => x(p.hz))
			.y(y);
	const magLine = curve((p) => mag(p.magnitudeDb));
	const phLine = curve((p) => ph(p.phaseDeg));
	const xTicks = decadeTicks(x.domain()[0], x.domain()[1], x);
	const horizontal = (y: number) => `M0,${y}H${width}`;
	const phaseGuides = [-180, -540, 180].filter((v) => v >= ph.domain()[0] && v <= ph.domain()[1]).map((v) => horizontal(ph(v)));
	return {
		magnitude: {
			width,
			height,
			curves: cases.map((c) => ({ name: c.name, d: magLine(c.points) ?? '' })),
			guides: mag.domain()[0] <= 0 && mag.domain()[1] >= 0 ? [horizontal(mag(0))] : [],
			xTicks,
			yTicks: linearTicks(mag, 5),
			marks: []
		},
		phase: {
			width,
			height,
			curves: cases.map((c) => ({ name: c.name, d: phLine(c.points) ?? '' })),
			guides: phaseGuides,
			xTicks,
			yTicks: linearTicks(ph, 5),
			marks: []
		}
	};
}

/** Nyquist curve for ω > 0 and its mirror, in a square window around −1 and the origin. */
export function nyquistFrame(cases: CaseResponse[], size: number): PlotFrame {
	const pts = cases.flatMap((c) => c.points).filter((p) => finite(p.re) && finite(p.im));
	// Far-away branches (integrators at low frequency) would shrink the interesting part to a
	// dot: the window reaches at most a few units past −1.
	const reach = Math.min(4, Math.max(1.5, ...pts.map((p) => Math.hypot(p.re, p.im)).filter((r) => r < 4)));
	const x = scaleLinear().domain([-reach - 0.2, reach * 0.7 + 0.2]).range([0, size]).nice();
	const span = x.domain()[1] - x.domain()[0];
	const y = scaleLinear().domain([-span / 2, span / 2]).range([size, 0]);
	const path = line<{ re: number; im: number }>()
		.defined((p) => finite(p.re) && finite(p.im))
		.x((p) => x(p.re))
		.y((p) => y(p.im));
	const cx = x(0);
	const cy = y(0);
	const r = Math.abs(x(1) - x(0));
	const unitCircle = `M${cx - r},${cy}A${r},${r} 0 1 0 ${cx + r},${cy}A${r},${r} 0 1 0 ${cx - r},${cy}Z`;
	return {
		width: size,
		height: size,
		curves: cases.map((c) => ({
			name: c.name,
			d: `${path(c.points) ?? ''}${path(c.points.map((p) => ({ re: p.re, im: -p.im }))) ?? ''}`
		})),
		guides: [`M0,${cy}H${size}`, `M${cx},0V${size}`, unitCircle],
		xTicks: linearTicks(x, 5),
		yTicks: linearTicks(y, 5),
		marks: [{ x: x(-1), y: y(0), label: '−1' }]
	};
}
