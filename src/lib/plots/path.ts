/**
 * Path data shared by the Bode and Nyquist geometry: polylines clipped to a rectangle, then written
 * as SVG path strings (absolute M/L/Z commands only, two decimals), so the same string draws in an
 * SVG `<path d>` and in pdfkit's `doc.path(d)`.
 */
import { line } from 'd3-shape';

export type Pt = [number, number];

/** A rectangle in pixels: the plotting area inside the axes. */
export interface Rect {
	left: number;
	top: number;
	right: number;
	bottom: number;
}

const lineGen = line<Pt>()
	.x((p) => p[0])
	.y((p) => p[1])
	.digits(2);

/** Several polylines as one path string ("" when there is nothing to draw). */
export function polylinesPath(pieces: Pt[][]): string {
	return pieces
		.filter((p) => p.length >= 2)
		.map((p) => lineGen(p) ?? '')
		.join('');
}

/** A closed polygon (e.g. a filled disc) as a path string. */
export function polygonPath(points: Pt[]): string {
	return points.length < 3 ? '' : `${lineGen(points)}Z`;
}

const r2 = (v: number) => Math.round(v * 100) / 100;

/** A straight segment. */
export function segmentPath(a: Pt, b: Pt): string {
	return `M${r2(a[0])},${r2(a[1])}L${r2(b[0])},${r2(b[1])}`;
}

/**
 * Liang–Barsky: the part of segment a→b inside the rectangle, as parameters [t0, t1] of the
 * segment, or null when it misses the rectangle.
 */
function clipSegment(a: Pt, b: Pt, r: Rect): [number, number] | null {
	const dx = b[0] - a[0];
	const dy = b[1] - a[1];
	let t0 = 0;
	let t1 = 1;
	const edges: [number, number][] = [
		[-dx, a[0] - r.left],
		[dx, r.right - a[0]],
		[-dy, a[1] - r.top],
		[dy, r.bottom - a[1]]
	];
	for (const [p, q] of edges) {
		if (p === 0) {
			if (q < 0) return null;
			continue;
		}
		const t = q / p;
		if (p < 0) {
			if (t > t1) return null;
			if (t > t0) t0 = t;
		} else {
			if (t < t0) return null;
			if (t < t1) t1 = t;
		}
	}
	return [t0, t1];
}

const lerp = (a: Pt, b: Pt, t: number): Pt => [a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t];

/**
 * A polyline clipped to a rectangle: the pieces inside it, each ending exactly on the edge where
 * the curve leaves. A non-finite point (a zero on the axis, log of 0) breaks the line there.
 */
export function clipPolyline(points: Pt[], r: Rect): Pt[][] {
	const pieces: Pt[][] = [];
	let current: Pt[] = [];
	const flush = () => {
		if (current.length >= 2) pieces.push(current);
		current = [];
	};
	for (let i = 1; i < points.length; i++) {
		const a = points[i - 1];
		const b = points[i];
		if (![a[0], a[1], b[0], b[1]].every(Number.isFinite)) {
			flush();
			continue;
		}
		const t = clipSegment(a, b, r);
		if (!t) {
			flush();
			continue;
		}
		const start = t[0] === 0 ? a : lerp(a, b, t[0]);
		const end = t[1] === 1 ? b : lerp(a, b, t[1]);
		if (current.length === 0 || t[0] > 0) {
			flush();
			current.push(start);
		}
		current.push(end);
		if (t[1] < 1) flush();
	}
	flush();
	return pieces;
}

/** Points of a circular arc (angles in radians, counter-clockwise in the maths sense). */
export function arcPoints(
	cx: number,
	cy: number,
	radius: number,
	from: number,
	to: number,
	steps = 96
): Pt[] {
	const n = Math.max(2, Math.ceil((steps * Math.abs(to - from)) / (2 * Math.PI)));
	const out: Pt[] = [];
	for (let i = 0; i <= n; i++) {
		const a = from + ((to - from) * i) / n;
		out.push([cx + radius * Math.cos(a), cy + radius * Math.sin(a)]);
	}
	return out;
}
