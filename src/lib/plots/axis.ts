/** Axes and layout helpers the Bode and Nyquist geometry share. */
import type { Tick } from './ticks';

export interface Insets {
	top: number;
	right: number;
	bottom: number;
	left: number;
}

export interface Axis {
	domain: [number, number];
	/** Pixel range, [start, end] (y axes run bottom → top, so start > end). */
	range: [number, number];
	ticks: Tick[];
	toPx: (v: number) => number;
	fromPx: (px: number) => number;
}

export const clamp = (v: number, a: number, b: number) =>
	Math.min(Math.max(v, Math.min(a, b)), Math.max(a, b));

/** An axis over a d3 scale: its ticks are computed against the same pixel mapping. */
export function axis(
	scale: { (v: number): number; invert(px: number): number },
	domain: [number, number],
	range: [number, number],
	ticks: (toPx: (v: number) => number) => Tick[]
): Axis {
	const toPx = (v: number) => scale(v);
	return { domain, range, toPx, fromPx: (px) => scale.invert(px), ticks: ticks(toPx) };
}
