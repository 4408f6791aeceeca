/**
 * What nyquistGeometry (nyquist.ts) takes and returns. Stable interface: the PDF reports draw
 * from it too. Add fields; do not rename or remove.
 */
import type { Targets } from '../compliance/criteria';
import type { Axis, Insets } from './axis';
import type { Pt, Rect } from './path';

export interface NyquistOptions {
	width: number;
	height: number;
	insets?: Partial<Insets>;
	/** Targets in force: draws the region they forbid. */
	targets?: Targets | null;
	/** Also draw the mirror image for negative frequencies (default true). */
	mirror?: boolean;
	/** Fix the view: centre (re, im) and half-size in units of L. */
	center?: [number, number];
	radius?: number;
	/** The curve is followed out to this |L| when fitting the view (default 2.5). */
	fitLimit?: number;
}

export interface NyquistCurve {
	name: string;
	index: number;
	/** Positive frequencies, 0 → highest. */
	path: string;
	/** Negative frequencies (the complex conjugate); "" when `mirror` is off. */
	mirrorPath: string;
	/** Small arrowheads along the positive branch, pointing towards rising frequency. */
	arrowsPath: string;
}

export interface ModulusCircle {
	caseName: string;
	caseIndex: number;
	/** The modulus margin min |1 + L|. */
	radius: number;
	path: string;
	/** The point of the curve nearest to −1 (at the peak-sensitivity frequency), when drawn. */
	nearest: { x: number; y: number; hz: number } | null;
	/** The radius from −1 to `nearest`. */
	radiusPath: string;
	worst: boolean;
	label: string;
}

export interface ForbiddenRegion {
	/** |1 + L| < radius: closed polygon, fill it. */
	disc: { radius: number; path: string; label: string } | null;
	/** Apollonius disc ruled out by a disk-gain-margin target; closed polygon. */
	diskMarginDisc: {
		alpha: number;
		centre: number;
		radius: number;
		path: string;
		label: string;
	} | null;
	/** Stretches of the negative real axis (stroke them thick). */
	gainSegments: { from: number; to: number; path: string; label: string }[];
	/** Arc of the unit circle within ±degrees of −1 (stroke it thick). */
	phaseArc: { degrees: number; path: string; label: string } | null;
	/** Words for a legend or a text summary, one line per part. */
	description: string[];
}

export interface NyquistGeometry {
	width: number;
	height: number;
	frame: Rect;
	/** Re axis (horizontal) and Im axis (vertical). */
	x: Axis;
	y: Axis;
	toPx: (re: number, im: number) => Pt;
	fromPx: (x: number, y: number) => Pt;
	curves: NyquistCurve[];
	criticalPoint: { x: number; y: number; path: string; label: string };
	unitCircle: string;
	/** Re and Im axes through 0, where they cross the frame. */
	axesPath: string;
	modulusCircles: ModulusCircle[];
	forbidden: ForbiddenRegion;
}
