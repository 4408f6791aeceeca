import { describe, expect, it } from 'vitest';
import { computeMargins, sampleResponse } from '../../../src/lib/margins/index';
import {
	bodeGeometry,
	clipPolyline,
	criticalLineNear,
	drawnMarginLines,
	labelledLines,
	logTicks,
	nyquistGeometry,
	alphaOfDiskGainDb,
	valueAt,
	type Pt
} from '../../../src/lib/plots/index';
import { model, poly } from '../margins/helpers';

/** Every coordinate pair of a path made of M/L/Z commands. */
function coords(d: string): Pt[] {
	expect(d).toMatch(/^([MLZ][-\d.,e]*)*$/);
	const out: Pt[] = [];
	for (const m of d.matchAll(/[ML](-?[\d.e-]+),(-?[\d.e-]+)/g))
		out.push([Number(m[1]), Number(m[2])]);
	return out;
}

const inside = (
	p: Pt,
	r: { left: number; right: number; top: number; bottom: number },
	tol = 0.01
) => p[0] >= r.left - tol && p[0] <= r.right + tol && p[1] >= r.top - tol && p[1] <= r.bottom + tol;

describe('clipPolyline', () => {
	const rect = { left: 0, top: 0, right: 10, bottom: 10 };
	it('cuts a line at the edges where it leaves and re-enters', () => {
		const pieces = clipPolyline(
			[
				[-5, 5],
				[5, 5],
				[15, 5],
				[15, 8],
				[5, 8]
			],
			rect
		);
		expect(pieces).toEqual([
			[
				[0, 5],
				[5, 5],
				[10, 5]
			],
			[
				[10, 8],
				[5, 8]
			]
		]);
	});
	it('breaks at non-finite points and drops what misses the rectangle', () => {
		const pieces = clipPolyline(
			[
				[1, 1],
				[2, 2],
				[NaN, 3],
				[4, 4],
				[5, 5],
				[20, 20],
				[30, 30]
			],
			rect
		);
		expect(pieces).toEqual([
			[
				[1, 1],
				[2, 2]
			],
			[
				[4, 4],
				[5, 5],
				[10, 10]
			]
		]);
	});
});

describe('logTicks', () => {
	it('labels decades with SI prefixes and keeps 2…9 as minor ticks', () => {
		const ticks = logTicks([0.5, 2000], (v) => Math.log10(v), 10);
		const labelled = ticks.filter((t) => t.label).map((t) => t.label);
		expect(labelled).toEqual(['1 Hz', '10 Hz', '100 Hz', '1 kHz']);
		expect(ticks.find((t) => t.value === 0.5)?.major).toBe(false);
		expect(ticks.find((t) => t.value === 2000)).toBeDefined();
	});
});

describe('bodeGeometry', () => {
	// L = 10/s: |L| = 1 at ω = 10 rad/s, phase −90° everywhere, so PM = 90° and no phase crossover.
	const integrator = model({ blocks: [poly([10], [1, 0])] });
	// L = 4/(s+1)³: phase −180° at ω = √3 where |L| = 4/8, so GM = 20·log10 2 ≈ 6.02 dB.
	const thirdOrder = model({ blocks: [poly([4], [1, 3, 3, 1])] });

	it('marks the gain crossover of k/s on 0 dB and draws PM from −90° down to −180°', () => {
		const g = bodeGeometry(sampleResponse(integrator), computeMargins(integrator), {
			width: 640,
			height: 420
		});
		const hz = 10 / (2 * Math.PI);
		expect(g.gainCrossovers).toHaveLength(1);
		const m = g.gainCrossovers[0];
		expect(m.hz).toBeCloseTo(hz, 9);
		expect(m.x).toBeCloseTo(g.x.toPx(hz), 6);
		expect(m.y).toBeCloseTo(g.zeroDb.y, 9);
		expect(g.zeroDb.y).toBeCloseTo(g.magnitude.toPx(0), 9);
		expect(g.phaseCrossovers).toHaveLength(0);
		expect(g.gainMarginLines).toHaveLength(0);
		const pm = g.phaseMarginLines[0];
		expect(pm.value).toBeCloseTo(90, 6);
		expect(pm.y1).toBeCloseTo(g.phase.toPx(-90), 6);
		expect(pm.y2).toBeCloseTo(g.phase.toPx(-180), 6);
		expect(pm.label).toBe('PM 90°');
		expect(pm.clipped).toBe(false);
		// −180° must be on the phase axis for the dimension line to reach it
		expect(g.criticalLines.map((l) => l.value)).toContain(-180);
	});

	it('marks the phase crossover on −180° and draws GM from the magnitude curve to 0 dB', () => {
		const r = computeMargins(thirdOrder);
		const g = bodeGeometry(sampleResponse(thirdOrder), r, { width: 640, height: 420 });
		expect(g.phaseCrossovers).toHaveLength(1);
		const p = g.phaseCrossovers[0];
		expect(p.hz).toBeCloseTo(Math.sqrt(3) / (2 * Math.PI), 9);
		expect(p.criticalDeg).toBe(-180);
		expect(p.y).toBeCloseTo(g.phase.toPx(-180), 6);
		const gm = g.gainMarginLines[0];
		expect(gm.value).toBeCloseTo(20 * Math.log10(2), 6);
		expect(gm.y1).toBeCloseTo(g.magnitude.toPx(-20 * Math.log10(2)), 6);
		expect(gm.y2).toBeCloseTo(g.zeroDb.y, 9);
		expect(gm.label).toBe('GM 6.02 dB');
	});

	it('keeps every curve inside its panel and uses only M/L commands', () => {
		const g = bodeGeometry(sampleResponse(thirdOrder), computeMargins(thirdOrder), {
			width: 400,
			height: 300,
			magnitudeDomainDb: [-20, 20]
		});
		const mag = coords(g.curves[0].magnitudePath);
		const ph = coords(g.curves[0].phasePath);
		expect(mag.length).toBeGreaterThan(50);
		expect(mag.every((p) => inside(p, g.magnitudePanel))).toBe(true);
		expect(ph.every((p) => inside(p, g.phasePanel))).toBe(true);
		// the magnitude runs from +12 dB down past −20 dB: the clipped piece ends on the bottom edge
		expect(Math.max(...mag.map((p) => p[1]))).toBeCloseTo(g.magnitudePanel.bottom, 1);
		expect(Math.min(...mag.map((p) => p[1]))).toBeGreaterThan(g.magnitudePanel.top);
	});

	it('puts phase crossovers of a delayed loop on their own −180° + k·360° lines', () => {
		// 2/s with 0.5 s delay: phase −90° − 28.6°·ω, crossing −180° and −540° and beyond
		const m = model({ delaySeconds: 0.5, blocks: [poly([0.5], [1, 0])] });
		const r = computeMargins(m);
		const g = bodeGeometry(sampleResponse(m), r, { width: 800, height: 500 });
		expect(g.phaseCrossovers.length).toBeGreaterThanOrEqual(2);
		const lines = g.phaseCrossovers.map((p) => p.criticalDeg);
		expect(lines[0]).toBe(-180);
		expect(lines[1]).toBe(-540);
		for (const p of g.phaseCrossovers) {
			const ph = valueAt(sampleResponse(m)[0].points, p.hz, 'phaseDeg');
			expect(ph).toBeCloseTo(p.criticalDeg, 4);
		}
		// the phase axis keeps at most 540° (the default cap), from the top, with the first crossover
		expect(g.phase.domain[1] - g.phase.domain[0]).toBeLessThanOrEqual(540);
		expect(g.phaseCrossovers[0].inside).toBe(true);
		// only the crossover the upper gain margin comes from is primary (labelled in a crowd)
		expect(g.gainMarginLines.filter((l) => l.primary).map((l) => l.hz)).toEqual([
			r.cases[0].upperGainMarginHz
		]);
		// with the phase axis cut short, crossovers on lines off the axis say they are outside
		const cut = bodeGeometry(sampleResponse(m), r, {
			width: 800,
			height: 500,
			phaseDomainDeg: [-360, 0]
		});
		expect(cut.phaseCrossovers.map((p) => p.inside)).toEqual(
			g.phaseCrossovers.map((p) => p.criticalDeg === -180)
		);
		expect(criticalLineNear(-530)).toBe(-540);
		expect(criticalLineNear(170)).toBe(180);
	});

	it('labels only dimension lines whose labels do not collide, reported margins first', () => {
		const m = model({
			blocks: [poly([4], [1, 3, 3, 1])],
			cases: [{ name: 'a' }, { name: 'b', gain: 1.01 }]
		});
		const g = bodeGeometry(sampleResponse(m), computeMargins(m), { width: 600, height: 400 });
		// the two cases' gain margins sit a pixel apart: one label, not two on top of each other
		expect(g.gainMarginLines).toHaveLength(2);
		expect(labelledLines(g.gainMarginLines).map((l) => l.caseName)).toEqual(['b']); // the smaller margin
		const apart = g.gainMarginLines.map((l, i) => ({ ...l, labelY: l.labelY + i * 40 }));
		expect(labelledLines(apart)).toHaveLength(2);
	});

	it('draws every margin line while there are few, only the reported ones in a crowd', () => {
		const m = model({
			blocks: [poly([4], [1, 3, 3, 1])],
			cases: [{ name: 'a' }, { name: 'b', gain: 1.01 }]
		});
		const lines = bodeGeometry(sampleResponse(m), computeMargins(m), {
			width: 600,
			height: 400
		}).gainMarginLines;
		expect(drawnMarginLines(lines)).toHaveLength(lines.length);
		// a crowd, as a long delay makes: twelve lines of which one is reported
		const crowd = Array.from({ length: 12 }, (_, i) => ({
			...lines[0],
			primary: i === 5,
			hz: i + 1
		}));
		expect(drawnMarginLines(crowd).map((l) => l.hz)).toEqual([6]);
	});

	it('draws one curve per case, with markers naming their case', () => {
		const m = model({
			blocks: [poly([4], [1, 3, 3, 1])],
			cases: [{ name: 'light' }, { name: 'heavy', gain: 2 }]
		});
		const g = bodeGeometry(sampleResponse(m), computeMargins(m), { width: 600, height: 400 });
		expect(g.curves.map((c) => c.name)).toEqual(['light', 'heavy']);
		expect(g.gainMarginLines.map((l) => l.caseName)).toEqual(['light', 'heavy']);
		expect(g.gainMarginLines[1].value).toBeCloseTo(20 * Math.log10(1), 6);
	});
});

describe('nyquistGeometry', () => {
	const m = model({ blocks: [poly([4], [1, 3, 3, 1])] });
	const targets = {
		minModulusMargin: '0.5',
		maxPeakSensitivity: '1.6',
		minUpperGainMarginDb: '6',
		minLowerGainMarginDb: '3',
		minPhaseMarginDeg: '45'
	};
	const g = nyquistGeometry(sampleResponse(m), computeMargins(m), {
		width: 500,
		height: 400,
		targets
	});
	const unit = g.x.toPx(1) - g.x.toPx(0);

	it('uses equal units on both axes and puts −1 where it belongs', () => {
		expect(g.y.toPx(0) - g.y.toPx(1)).toBeCloseTo(unit, 9);
		expect(g.criticalPoint.x).toBeCloseTo(g.x.toPx(-1), 9);
		expect(g.criticalPoint.y).toBeCloseTo(g.y.toPx(0), 9);
		const pts = coords(g.unitCircle);
		for (const [x, y] of pts)
			expect(Math.hypot(x - g.x.toPx(0), y - g.y.toPx(0))).toBeCloseTo(unit, 0);
	});

	it('draws the modulus-margin circle around −1 touching the curve', () => {
		const r = computeMargins(m).cases[0];
		const [c] = g.modulusCircles;
		expect(c.radius).toBe(r.modulusMargin);
		expect(c.worst).toBe(true);
		const pts = coords(c.path);
		for (const [x, y] of pts)
			expect(Math.hypot(x - g.criticalPoint.x, y - g.criticalPoint.y)).toBeCloseTo(
				c.radius * unit,
				0
			);
		expect(c.nearest).not.toBeNull();
		expect(
			Math.hypot(c.nearest!.x - g.criticalPoint.x, c.nearest!.y - g.criticalPoint.y)
		).toBeCloseTo(c.radius * unit, 0);
	});

	it('forbids the disc, the gain-margin segments and the phase-margin arc the targets set', () => {
		const f = g.forbidden;
		// 1/1.6 = 0.625 is stricter than 0.5
		expect(f.disc?.radius).toBeCloseTo(0.625, 12);
		const [up, low] = f.gainSegments;
		expect(up.to).toBeCloseTo(-(10 ** (-6 / 20)), 12);
		expect(up.from).toBe(-1);
		expect(low.from).toBeCloseTo(-(10 ** (3 / 20)), 12);
		const arc = coords(f.phaseArc!.path);
		const angle = ([x, y]: Pt) => (Math.atan2(-(y - g.y.toPx(0)), x - g.x.toPx(0)) * 180) / Math.PI;
		expect(Math.abs(angle(arc[0]))).toBeCloseTo(135, 0);
		expect(Math.abs(angle(arc[arc.length - 1]))).toBeCloseTo(135, 0);
		expect(f.description).toHaveLength(4);
		expect(f.diskMarginDisc).toBeNull();
	});

	it('the disk-margin disc is the Apollonius circle |1+L| = (α/2)|1−L|', () => {
		const alpha = alphaOfDiskGainDb(6);
		expect(20 * Math.log10((2 + alpha) / (2 - alpha))).toBeCloseTo(6, 12);
		const d = nyquistGeometry([], null, {
			width: 300,
			height: 300,
			targets: { minDiskGainMarginDb: '6' }
		}).forbidden.diskMarginDisc!;
		for (const re of [d.centre - d.radius, d.centre + d.radius]) {
			expect(Math.abs(1 + re)).toBeCloseTo((alpha / 2) * Math.abs(1 - re), 12);
		}
	});

	it('clips an integrator that runs to infinity to the frame, and mirrors negative frequencies', () => {
		const int = model({ blocks: [poly([10], [1, 1, 0])] });
		const n = nyquistGeometry(sampleResponse(int), computeMargins(int), {
			width: 300,
			height: 300
		});
		const pts = coords(n.curves[0].path);
		expect(pts.length).toBeGreaterThan(20);
		expect(pts.every((p) => inside(p, n.frame))).toBe(true);
		const mirror = coords(n.curves[0].mirrorPath);
		const axisY = n.y.toPx(0);
		expect(mirror.length).toBe(pts.length);
		mirror.forEach((p, i) => expect(p[1] - axisY).toBeCloseTo(axisY - pts[i][1], 1));
		expect(n.curves[0].arrowsPath).not.toBe('');
		expect(
			nyquistGeometry(sampleResponse(int), null, { width: 300, height: 300, mirror: false })
				.curves[0].mirrorPath
		).toBe('');
	});
});
