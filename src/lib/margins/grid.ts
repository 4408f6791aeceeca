/**
 * Frequency grids: log-spaced over a band set by the loop's own features, with extra points where
 * a lightly damped root makes the response change within a fraction of its frequency.
 */
import { hypot } from './hypot';
import { sortNumbers } from './small-sort';

export function logGrid(lo: number, hi: number, perDecade: number): number[] {
	if (!(hi > lo) || !(lo > 0)) return [lo];
	const count = Math.max(2, Math.ceil(Math.log10(hi / lo) * perDecade) + 1);
	const step = Math.log(hi / lo) / (count - 1);
	const out = new Array<number>(count);
	for (let i = 0; i < count; i++) out[i] = lo * Math.exp(step * i);
	out[count - 1] = hi;
	return out;
}

/** A resonance-like feature: centre frequency and decay rate (both in the grid's unit). */
export interface Feature {
	centre: number;
	decay: number;
}

/** Relative damping below which a feature gets its own points. */
export const LIGHT_DAMPING = 0.3;
const OFFSETS = [-6, -3, -1.5, -0.7, -0.3, 0, 0.3, 0.7, 1.5, 3, 6];

/** The sorted grid with the feature points (and `extra` ones) merged in, duplicates dropped. */
export function withFeatures(
	grid: number[],
	features: Feature[],
	lo: number,
	hi: number,
	extra: number[] = []
): number[] {
	const add: number[] = [];
	for (const { centre, decay } of features) {
		if (!(centre > 0) || Math.abs(decay) >= LIGHT_DAMPING * hypot(centre, decay)) continue;
		for (let k = 0; k < OFFSETS.length; k++) {
			const f = centre + Math.abs(decay) * OFFSETS[k];
			if (f >= lo && f <= hi) add.push(f);
		}
	}
	for (let k = 0; k < extra.length; k++) if (extra[k] >= lo && extra[k] <= hi) add.push(extra[k]);
	if (add.length === 0) return grid;
	const sorted = sortNumbers(add);
	const out: number[] = [];
	let j = 0;
	for (let k = 0; k < grid.length; k++) {
		const g = grid[k];
		while (j < sorted.length && sorted[j] < g) pushDistinct(out, sorted[j++]);
		pushDistinct(out, g);
	}
	while (j < sorted.length) pushDistinct(out, sorted[j++]);
	return out;
}

/** Appends f unless it repeats the last point (a module function: no closure per call). */
function pushDistinct(out: number[], f: number): void {
	if (out.length === 0 || f > out[out.length - 1] * (1 + 1e-12)) out.push(f);
}

/** [lo, hi] spanning `spread` beyond the outermost positive feature frequencies. */
export function band(frequencies: number[], spread: number, fallback: number): [number, number] {
	const f = frequencies.filter((x) => x > 0 && Number.isFinite(x));
	if (f.length === 0) return [fallback / spread, fallback * spread];
	return [Math.min(...f) / spread, Math.max(...f) * spread];
}
