/**
 * What bodeGeometry (bode.ts) takes and returns. Stable interface: the PDF reports draw from it
 * too. Add fields; do not rename or remove.
 */
import type { Axis, Insets } from './axis';
import type { Rect } from './path';

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
