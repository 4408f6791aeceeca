/**
 * Nyquist plot geometry: pure numbers and SVG path strings, no DOM.
 *
 *   nyquistGeometry(responses, margins, { width, height, targets }) → NyquistGeometry
 *
 * - `responses`: the engine's `sampleResponse(model)`; `margins`: `computeMargins(model)` for the
 *   same model and gain scale (or null); `targets`: the requirement's targets (or null) for the
 *   region they forbid.
 * - One unit of Re and one of Im take the same number of pixels (circles stay round). The view
 *   window is fitted around the −1 point, the unit circle and the curve where |L| ≤ `fitLimit`
 *   (default 2.5) unless `center` / `radius` fix it; curves are clipped to `frame`, so a loop with
 *   integrators that runs off to infinity still draws as a clean line to the edge.
 * - The forbidden region of the targets: the disc |1 + L| < required modulus margin (the larger
 *   of min modulus margin and 1 / max peak sensitivity), the segments of the negative real axis
 *   that the gain-margin targets rule out ([−1, −10^(−GMu/20)] and [−10^(GMl/20), −1]), the arc of
 *   the unit circle within ±PM of −1, and the disc that the disk-margin target rules out
 *   (|1 + L| < (α/2)·|1 − L|, an Apollonius circle). Filled shapes are closed polygons.
 * - All coordinates are pixels in a box of `width` × `height`, origin top left, Im up.
 *
 * Stable interface: the PDF reports draw from it too. Add fields; do not rename or remove.
 * Types: nyquist-types.ts; the forbidden region: nyquist-forbidden.ts.
 */
import { scaleLinear } from 'd3-scale';
import type { CaseResponse } from '../margins/sampler';
import type { MarginsResult } from '../margins/types';
import type { Axis, Insets } from './axis';
import { forbiddenRadius, forbiddenRegion } from './nyquist-forbidden';
import type { ModulusCircle, NyquistCurve, NyquistGeometry, NyquistOptions } from './nyquist-types';
import { arcPoints, clipPolyline, polylinesPath, segmentPath, type Pt, type Rect } from './path';
import { nearestIndex } from './response';
import { formatNumber, pickStep, stepTicks } from './ticks';

const DEFAULT_INSETS: Insets = { top: 10, right: 14, bottom: 34, left: 50 };

function fitWindow(
	responses: readonly CaseResponse[],
	limit: number,
	extra: number
): { cx: number; cy: number; half: number } {
	let x0 = -1 - extra;
	let x1 = Math.max(1, -1 + extra);
	let y0 = -Math.max(1, extra);
	let y1 = Math.max(1, extra);
	for (const r of responses)
		for (const p of r.points) {
			if (!Number.isFinite(p.re) || !Number.isFinite(p.im) || Math.hypot(p.re, p.im) > limit)
				continue;
			x0 = Math.min(x0, p.re);
			x1 = Math.max(x1, p.re);
			// the mirror branch makes the picture symmetric in Im
			const a = Math.abs(p.im);
			y0 = Math.min(y0, -a);
			y1 = Math.max(y1, a);
		}
	return { cx: (x0 + x1) / 2, cy: (y0 + y1) / 2, half: Math.max(x1 - x0, y1 - y0) * 0.54 };
}

export function nyquistGeometry(
	responses: readonly CaseResponse[],
	margins: MarginsResult | null,
	options: NyquistOptions
): NyquistGeometry {
	const ins = { ...DEFAULT_INSETS, ...options.insets };
	const width = Math.max(80, options.width);
	const height = Math.max(80, options.height);
	const targets = options.targets ?? null;
	const mirror = options.mirror ?? true;
	const boxW = Math.max(20, width - ins.left - ins.right);
	const boxH = Math.max(20, height - ins.top - ins.bottom);

	const mmRadius = forbiddenRadius(targets);
	const caseMm = (margins?.cases ?? []).map((c) => c.modulusMargin ?? 0);
	const extra = Math.max(mmRadius, ...caseMm.filter((m) => m < 3), 0) + 0.1;
	const fit = fitWindow(responses, options.fitLimit ?? 2.5, extra);
	const cx = options.center?.[0] ?? fit.cx;
	const cy = options.center?.[1] ?? fit.cy;
	const half = options.radius ?? fit.half;
	// equal units on both axes: the shorter side of the box sets the scale
	const pxPerUnit = Math.min(boxW, boxH) / (2 * half);
	const reHalf = boxW / pxPerUnit / 2;
	const imHalf = boxH / pxPerUnit / 2;
	const frame: Rect = {
		left: ins.left,
		top: ins.top,
		right: ins.left + boxW,
		bottom: ins.top + boxH
	};
	const reDomain: [number, number] = [cx - reHalf, cx + reHalf];
	const imDomain: [number, number] = [cy - imHalf, cy + imHalf];
	const xs = scaleLinear().domain(reDomain).range([frame.left, frame.right]);
	const ys = scaleLinear().domain(imDomain).range([frame.bottom, frame.top]);
	const toPx = (re: number, im: number): Pt => [xs(re), ys(im)];
	const fromPx = (px: number, py: number): Pt => [xs.invert(px), ys.invert(py)];

	const step = pickStep(
		2 * Math.max(reHalf, imHalf),
		[0.1, 0.2, 0.25, 0.5, 1, 2, 2.5, 5, 10, 20, 25, 50, 100],
		8
	);
	const x: Axis = {
		domain: reDomain,
		range: [frame.left, frame.right],
		toPx: xs,
		fromPx: (p) => xs.invert(p),
		ticks: stepTicks(reDomain, step, xs, '')
	};
	const y: Axis = {
		domain: imDomain,
		range: [frame.bottom, frame.top],
		toPx: ys,
		fromPx: (p) => ys.invert(p),
		ticks: stepTicks(imDomain, step, ys, '')
	};

	const curves: NyquistCurve[] = responses.map((r, index) => {
		const pts: Pt[] = r.points.map((p) => toPx(p.re, p.im));
		const mirrored: Pt[] = mirror ? r.points.map((p) => toPx(p.re, -p.im)) : [];
		return {
			name: r.name,
			index,
			path: polylinesPath(clipPolyline(pts, frame)),
			mirrorPath: mirror ? polylinesPath(clipPolyline(mirrored, frame)) : '',
			arrowsPath: arrows(pts, frame)
		};
	});

	const [mx, my] = toPx(-1, 0);
	const c = 5;
	const criticalPoint = {
		x: mx,
		y: my,
		path: `${segmentPath([mx - c, my - c], [mx + c, my + c])}${segmentPath([mx - c, my + c], [mx + c, my - c])}`,
		label: '−1'
	};
	const circle = (re: number, im: number, radius: number) =>
		arcPoints(re, im, radius, 0, 2 * Math.PI).map(([a, b]) => toPx(a, b));
	const unitCircle = polylinesPath(clipPolyline(circle(0, 0, 1), frame));
	const axesPath =
		polylinesPath(clipPolyline([toPx(reDomain[0], 0), toPx(reDomain[1], 0)], frame)) +
		polylinesPath(clipPolyline([toPx(0, imDomain[0]), toPx(0, imDomain[1])], frame));

	const worstMm = margins?.worstCase.modulusMargin ?? null;
	const worstFrom = margins?.worstCase.from.modulusMargin;
	const modulusCircles: ModulusCircle[] = (margins?.cases ?? []).flatMap((cs, caseIndex) => {
		const radius = cs.modulusMargin;
		if (radius === null || !Number.isFinite(radius) || radius <= 0) return [];
		const pts = responses[caseIndex]?.points ?? [];
		let nearest: ModulusCircle['nearest'] = null;
		if (cs.peakSensitivityHz !== null && pts.length) {
			const p = pts[nearestIndex(pts, cs.peakSensitivityHz)];
			const [px, py] = toPx(p.re, p.im);
			nearest = { x: px, y: py, hz: p.hz };
		}
		return [
			{
				caseName: cs.name,
				caseIndex,
				radius,
				path: polylinesPath(clipPolyline(circle(-1, 0, radius), frame)),
				nearest,
				radiusPath: nearest
					? polylinesPath(
							clipPolyline(
								[
									[mx, my],
									[nearest.x, nearest.y]
								],
								frame
							)
						)
					: '',
				worst: worstFrom !== undefined ? worstFrom === cs.name : radius === worstMm,
				label: `modulus margin ${formatNumber(radius, 3)}`
			}
		];
	});

	return {
		width,
		height,
		frame,
		x,
		y,
		toPx,
		fromPx,
		curves,
		criticalPoint,
		unitCircle,
		axesPath,
		modulusCircles,
		forbidden: forbiddenRegion(targets, toPx, frame)
	};
}

/** Arrowheads at a few places along the visible curve, pointing along it. */
function arrows(pts: Pt[], frame: Rect, count = 3): string {
	const inside = pts.filter(
		(p) =>
			Number.isFinite(p[0]) &&
			Number.isFinite(p[1]) &&
			p[0] > frame.left &&
			p[0] < frame.right &&
			p[1] > frame.top &&
			p[1] < frame.bottom
	);
	if (inside.length < 8) return '';
	// arc length along the visible points, arrows at equal spacing
	const cum = [0];
	for (let i = 1; i < inside.length; i++)
		cum.push(
			cum[i - 1] + Math.hypot(inside[i][0] - inside[i - 1][0], inside[i][1] - inside[i - 1][1])
		);
	const total = cum[cum.length - 1];
	if (total < 40) return '';
	let out = '';
	let j = 1;
	for (let k = 1; k <= count; k++) {
		const target = (total * k) / (count + 1);
		while (j < inside.length - 1 && cum[j] < target) j++;
		const [ax, ay] = inside[j - 1];
		const [bx, by] = inside[j];
		const len = Math.hypot(bx - ax, by - ay);
		if (len === 0) continue;
		const ux = (bx - ax) / len;
		const uy = (by - ay) / len;
		const s = 6;
		const tip: Pt = [bx, by];
		const l: Pt = [bx - s * ux + s * 0.5 * uy, by - s * uy - s * 0.5 * ux];
		const r: Pt = [bx - s * ux - s * 0.5 * uy, by - s * uy + s * 0.5 * ux];
		out += polylinesPath([[l, tip, r]]);
	}
	return out;
}
