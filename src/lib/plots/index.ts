/**
 * Plot geometry for Bode and Nyquist plots: pure TypeScript on d3-scale and d3-shape, no DOM, no
 * Svelte, no Node imports. The Svelte components and the PDF reports draw the same path strings.
 * Interface and conventions: README.md beside this file.
 */
export { type Axis, type Insets } from './axis';
export { bodeGeometry } from './bode';
export { drawnMarginLines, labelledLines } from './bode-markers';
export {
	type BodeCurve,
	type BodeGeometry,
	type BodeOptions,
	type DimensionLine,
	type GainCrossoverMarker,
	type PhaseCrossoverMarker,
	type ReferenceLine
} from './bode-types';
export { criticalLineNear, nearestIndex, valueAt } from './response';
export { nyquistGeometry } from './nyquist';
export { alphaOfDiskGainDb, forbiddenRadius } from './nyquist-forbidden';
export {
	type ForbiddenRegion,
	type ModulusCircle,
	type NyquistCurve,
	type NyquistGeometry,
	type NyquistOptions
} from './nyquist-types';
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
