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
 * Types: bode-types.ts; panels and axes: bode-frame.ts; crossovers and margin lines:
 * bode-markers.ts.
 */
import type { CaseResponse } from '../margins/sampler';
import type { MarginsResult } from '../margins/types';
import { bodeFrame } from './bode-frame';
import { bodeMarkers } from './bode-markers';
import type { BodeCurve, BodeGeometry, BodeOptions, ReferenceLine } from './bode-types';
import { clipPolyline, polylinesPath, segmentPath, type Pt, type Rect } from './path';
import { formatHz, formatNumber } from './ticks';

export function bodeGeometry(
	responses: readonly CaseResponse[],
	margins: MarginsResult | null,
	options: BodeOptions
): BodeGeometry {
	const frame = bodeFrame(responses, margins, options);
	const { magnitudePanel, phasePanel } = frame;
	const hzDomain = frame.x.domain;
	const phDomain = frame.phase.domain;
	const xScale = frame.x.toPx;
	const magScale = frame.magnitude.toPx;
	const phScale = frame.phase.toPx;

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

	return {
		...frame,
		curves,
		zeroDb,
		criticalLines,
		nyquistLines,
		...bodeMarkers(responses, margins, frame)
	};
}
