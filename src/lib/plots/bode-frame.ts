/**
 * The frame of a Bode plot: the two panels (magnitude over phase) and their axes — one
 * log-frequency x axis shared by both, fitted to the sampled band, and y axes fitted to the data
 * and to every margin end that must show, unless the options fix them.
 */
import { scaleLinear, scaleLog } from 'd3-scale';
import type { CaseResponse } from '../margins/sampler';
import type { MarginsResult } from '../margins/types';
import { axis, clamp, type Insets } from './axis';
import type { BodeGeometry, BodeOptions } from './bode-types';
import type { Rect } from './path';
import { criticalLineNear, valueAt } from './response';
import { logTicks, niceDomain, pickStep, stepTicks } from './ticks';

/** The part of BodeGeometry that is layout: size, panels and axes. */
export type BodeFrame = Pick<
	BodeGeometry,
	'width' | 'height' | 'magnitudePanel' | 'phasePanel' | 'x' | 'magnitude' | 'phase'
>;

const DEFAULT_INSETS: Insets = { top: 10, right: 14, bottom: 34, left: 58 };

const finite = (vs: number[]) => vs.filter(Number.isFinite);

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

export function bodeFrame(
	responses: readonly CaseResponse[],
	margins: MarginsResult | null,
	options: BodeOptions
): BodeFrame {
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

	return { width, height, magnitudePanel, phasePanel, x, magnitude, phase };
}
