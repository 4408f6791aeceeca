/**
 * What-if gain: the margins and the verdict of a loop if its gain were scaled by k (every case
 * alike), and the range of gains over which it still meets every target in force — not only stays
 * stable. Pure (no I/O; the clock is an argument), so the browser's gain slider, the tests and any
 * server use reach the same answer as the worker's judge.
 *
 * "Meets" means the verdict is `compliant` or `covered` (every shortfall covered by an active
 * deviation) — the same rules as the stored verdict, through `judge()`.
 *
 * The range search walks a grid in log-gain (dB) around 0 dB and bisects each change of outcome
 * down to `toleranceDb`. The set of gains that meet the targets may be several intervals (a
 * conditionally stable loop, a crossover band); an interval narrower than the grid step can be
 * missed, which is why the step is small and the search span explicit.
 */
import { computeMargins } from '../margins/margins';
import type { LoopModel } from '../margins/schema';
import type { MarginsResult } from '../margins/types';
import type { Targets } from './criteria';
import { judge, type DeviationInput, type Judgement } from './judge';

export interface WhatIfInput {
	model: LoopModel;
	targets: Targets;
	deviations?: DeviationInput[];
	now: Date;
}

export interface WhatIfPoint {
	gainDb: number;
	gainScale: number;
	margins: MarginsResult;
	judgement: Judgement;
	meets: boolean;
}

/** One interval of gains (dB) that meets every target; a null end is open beyond the search span. */
export interface GainInterval {
	lowDb: number | null;
	highDb: number | null;
}

export interface MeetsRange {
	/** Whether the loop meets every target at nominal gain (0 dB). */
	nominalMeets: boolean;
	/** The interval containing 0 dB; when the nominal loop falls short, the interval nearest 0 dB; null if none was found. */
	interval: GainInterval | null;
	/** Every interval found in the searched span, ascending. */
	intervals: GainInterval[];
	/** The span searched, dB. */
	searchedDb: [number, number];
}

export interface RangeOptions {
	/** Search from −spanDb to +spanDb (default 40). */
	spanDb?: number;
	/** Grid step in dB (default 0.5). */
	stepDb?: number;
	/** Bisection stops when the boundary is known this closely (dB, default 0.005). */
	toleranceDb?: number;
}

export const dbToScale = (db: number) => 10 ** (db / 20);
export const scaleToDb = (k: number) => 20 * Math.log10(k);

const MEETS = new Set(['compliant', 'covered']);

/** Margins and verdict at a gain offset in dB (0 dB = as modelled). */
export function whatIfAt(input: WhatIfInput, gainDb: number): WhatIfPoint {
	if (!Number.isFinite(gainDb))
		throw new RangeError(`gain must be a finite number of dB, got ${gainDb}`);
	const gainScale = dbToScale(gainDb);
	const margins = computeMargins(input.model, { gainScale });
	const judgement = judge({
		state: 'computed',
		result: margins,
		targets: input.targets,
		deviations: input.deviations,
		now: input.now
	});
	return { gainDb, gainScale, margins, judgement, meets: MEETS.has(judgement.verdict) };
}

/** Whether the loop meets every target at a gain offset; a model the engine cannot evaluate there does not. */
function meetsAt(input: WhatIfInput, db: number): boolean {
	try {
		return whatIfAt(input, db).meets;
	} catch {
		return false;
	}
}

/** The boundary between a == outcome(a) and b, to within tol (a and b may be in either order). */
function bisect(input: WhatIfInput, a: number, b: number, outcomeA: boolean, tol: number): number {
	let lo = a;
	let hi = b;
	while (Math.abs(hi - lo) > tol) {
		const mid = (lo + hi) / 2;
		if (meetsAt(input, mid) === outcomeA) lo = mid;
		else hi = mid;
	}
	// report the end that still meets, so the interval's ends are gains that do
	return outcomeA ? lo : hi;
}

/** The gain range over which the loop meets every target in force. */
export function meetsRange(input: WhatIfInput, options: RangeOptions = {}): MeetsRange {
	const span = options.spanDb ?? 40;
	const step = options.stepDb ?? 0.5;
	const tol = options.toleranceDb ?? 0.005;
	if (!(span > 0) || !(step > 0) || !(tol > 0))
		throw new RangeError('spanDb, stepDb and toleranceDb must be > 0');
	const n = Math.ceil(span / step);
	const grid: number[] = [];
	for (let i = -n; i <= n; i++) grid.push((i * span) / n);
	const outcome = grid.map((db) => meetsAt(input, db));

	const intervals: GainInterval[] = [];
	let open: GainInterval | null = outcome[0] ? { lowDb: null, highDb: null } : null;
	for (let i = 1; i < grid.length; i++) {
		if (outcome[i] === outcome[i - 1]) continue;
		if (outcome[i]) {
			open = { lowDb: bisect(input, grid[i], grid[i - 1], true, tol), highDb: null };
		} else if (open) {
			open.highDb = bisect(input, grid[i - 1], grid[i], true, tol);
			intervals.push(open);
			open = null;
		}
	}
	if (open) intervals.push(open);

	const nominalMeets = outcome[n];
	const lowOf = (iv: GainInterval) => iv.lowDb ?? -Infinity;
	const highOf = (iv: GainInterval) => iv.highDb ?? Infinity;
	let interval: GainInterval | null = null;
	if (nominalMeets) {
		interval = intervals.find((iv) => lowOf(iv) <= 0 && highOf(iv) >= 0) ?? null;
	} else if (intervals.length) {
		const distance = (iv: GainInterval) => (highOf(iv) < 0 ? -highOf(iv) : lowOf(iv));
		interval = intervals.reduce((best, iv) => (distance(iv) < distance(best) ? iv : best));
	}
	return { nominalMeets, interval, intervals, searchedDb: [-span, span] };
}

const db = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : '±'}${Math.abs(v).toFixed(1)} dB`;

/** The range in words: "meets every target from −3.1 dB to +4.6 dB". */
export function describeRange(r: MeetsRange): string {
	const [lo, hi] = r.searchedDb;
	const part = (iv: GainInterval) => {
		const from = iv.lowDb === null ? `below ${db(lo)}` : db(iv.lowDb);
		const to = iv.highDb === null ? `beyond ${db(hi)}` : db(iv.highDb);
		return `from ${from} to ${to}`;
	};
	if (r.nominalMeets && r.interval) return `Meets every target ${part(r.interval)}.`;
	if (r.interval) {
		const others =
			r.intervals.length > 1
				? ` (and ${r.intervals.length - 1} more range${r.intervals.length > 2 ? 's' : ''} within ${db(lo)} to ${db(hi)})`
				: '';
		return `Does not meet its targets at nominal gain; it would ${part(r.interval)}${others}.`;
	}
	return `Does not meet its targets at any gain from ${db(lo)} to ${db(hi)}.`;
}
