/**
 * Plot geometry for Bode and Nyquist plots: pure TypeScript on d3-scale and d3-shape, no DOM, no
 * Svelte, no Node imports. The Svelte components and the PDF reports draw the same path strings.
 * Interface and conventions: README.md beside this file.
 */
export {
	bodeGeometry,
	criticalLineNear,
	drawnMarginLines,
	labelledLines,
	nearestIndex,
	valueAt,
	type Axis,
	type BodeCurve,
	type BodeGeometry,
	type BodeOptions,
	type DimensionLine,
	type GainCrossoverMarker,
	type Insets,
	type PhaseCrossoverMarker,
	type ReferenceLine
} from './bode';
export {
	alphaOfDiskGainDb,
	forbiddenRadius,
	nyquistGeometry,
	type ForbiddenRegion,
	type ModulusCircle,
	type NyquistCurve,
	type NyquistGeometry,
	type NyquistOptions
} from './nyquist';
export {
	clipPolyline,
	polylinesPath,
	polygonPath,
	segmentPath,
	arcPoints,
	type Pt,
	type Rect
} from './path';
export { formatHz, formatNumber, formatSigned, logTicks, type Tick } from './ticks';
