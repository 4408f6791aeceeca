/**
 * The evaluation grid of delayed and measured loops, and what the Nyquist count needs to know
 * about the rational part's roots: which are unstable, which sit on the boundary (and so are
 * passed by an indentation), which are lightly damped (and so need grid points of their own).
 */
import { band, logGrid, withFeatures, type Feature } from './grid';
import type { CaseLoop } from './loop';
import { arcCrossings, type Closure } from './nyquist';
import type { LoopResponse } from './response';
import { hypot } from './hypot';

export interface Sample {
	f: number;
	lnMag: number;
	phase: number;
	re: number;
	im: number;
	/** The interval ending here passes a root on the boundary (the phase jumps by m·180°). */
	jump?: boolean;
}

export interface RootClasses {
	unstable: number;
	/** Pole–zero cancellations on or beyond the boundary: closed-loop poles whatever the gain. */
	hidden: number;
	/** Net poles (poles − zeros) at s = 0 / z = 1, and at z = −1. */
	low: number;
	high: number;
	interior: { f: number; m: number }[];
	features: Feature[];
	freqs: number[];
}

const ON_BOUNDARY = 1e-9;
const MAX_POINTS = 20_000;

export function classifyRoots(resp: LoopResponse): RootClasses {
	const sampled = resp.sampled;
	const zeros = listOf(resp.zeros);
	const poles = listOf(resp.poles);
	const out: RootClasses = {
		unstable: 0,
		hidden: 0,
		low: 0,
		high: 0,
		interior: [],
		features: [],
		freqs: []
	};
	// distance from the boundary, signed: > 0 unstable side
	const side = ([a, b]: number[]) => (sampled ? hypot(a, b) - 1 : a / (hypot(a, b) || 1));
	const onBoundary = (r: number[]) =>
		(!sampled && r[0] === 0 && r[1] === 0) || Math.abs(side(r)) <= ON_BOUNDARY;
	const usedZero = new Uint8Array(zeros.length);
	const freePoles: number[][] = [];
	for (const p of poles) {
		// loose: a cancellation carried through a discretisation is only approximately exact
		const tol = 1e-6 * Math.max(hypot(p[0], p[1]), sampled ? 1 : 1e-300);
		const j = zeros.findIndex((z, i) => !usedZero[i] && hypot(z[0] - p[0], z[1] - p[1]) <= tol);
		if (j >= 0) {
			usedZero[j] = 1;
			if (onBoundary(p) || side(p) > 0) out.hidden++;
		} else freePoles.push(p);
	}
	const freeZeros = zeros.filter((_, i) => !usedZero[i]);
	const locations = new Map<number, number>();
	const mark = (r: number[], m: number) => {
		const loc = sampled ? Math.atan2(r[1], r[0]) : r[1];
		if (loc < 0) return; // the mirror half of the contour
		if (loc === 0 || (sampled && Math.abs(loc) < 1e-12)) out.low += m;
		else if (sampled && Math.PI - loc < 1e-12) out.high += m;
		else {
			const key = [...locations.keys()].find((k) => Math.abs(k - loc) <= 1e-9 * loc) ?? loc;
			locations.set(key, (locations.get(key) ?? 0) + m);
		}
	};
	for (const [list, m] of [
		[freePoles, 1],
		[freeZeros, -1]
	] as const)
		for (const r of list) {
			if (onBoundary(r)) {
				mark(r, m);
				continue;
			}
			if (m === 1 && side(r) > 0) out.unstable++;
			if (r[1] < 0) continue;
			const [centre, decay] = sampled
				? [Math.abs(Math.atan2(r[1], r[0])), Math.log(hypot(r[0], r[1]))]
				: [r[1], r[0]];
			const size = hypot(centre, decay);
			if (Number.isFinite(size) && size > 0) {
				out.features.push({ centre, decay });
				out.freqs.push(size);
			}
		}
	for (const [f, m] of locations) if (m !== 0) out.interior.push({ f, m });
	out.interior.sort((a, b) => a.f - b.f);
	return out;
}

const listOf = (r: { re: Float64Array; im: Float64Array }) =>
	Array.from(r.re, (x, i) => [x, r.im[i]]);

function sample(resp: LoopResponse, f: number, jump?: boolean): Sample {
	resp.at(f);
	return { f, lnMag: resp.lnMag, phase: resp.phase, re: resp.re, im: resp.im, jump };
}

/** The measured band (intersection of the blocks' ranges) and its frequencies (union). */
function measuredFrequencies(loop: CaseLoop, resp: LoopResponse): number[] {
	if (loop.measured.length === 1) return loop.measured[0].hz.map((h) => resp.internal(h));
	const lo = Math.max(...loop.measured.map((m) => m.hz[0]));
	const hi = Math.min(...loop.measured.map((m) => m.hz[m.hz.length - 1]));
	const all = loop.measured.flatMap((m) => m.hz.filter((h) => h >= lo && h <= hi));
	all.sort((a, b) => a - b);
	const out: number[] = [];
	let last = -Infinity;
	for (const h of all)
		if (h > last) {
			out.push(resp.internal(h));
			last = h;
		}
	return out;
}

/** The band follows the loop's roots and delay only (never its gain): scaling L moves margins, not grids. */
export function buildGrid(loop: CaseLoop, resp: LoopResponse, roots: RootClasses, reach = 1) {
	const measured = loop.measured.length > 0;
	let base: number[];
	if (measured) base = measuredFrequencies(loop, resp);
	else {
		const freqs = [...roots.freqs, ...roots.interior.map((r) => r.f)];
		if (resp.delay > 0) freqs.push(1 / resp.delay);
		let [lo, hi] = band(freqs, 100, resp.sampled ? 0.1 : 1);
		if (resp.sampled) {
			lo = Math.min(lo, Math.PI / 1000);
			// a pole at z = −1 is approached, not evaluated
			hi = roots.high > 0 ? Math.PI * (1 - 1e-7) : Math.PI;
		} else hi = continuousTop(resp, lo, hi * reach, reach, loop.caseGain);
		base = logGrid(lo, hi, 16);
	}
	const lo = base[0];
	const hi = base[base.length - 1];
	const points =
		measured && loop.factors.length === 0 ? base : withFeatures(base, roots.features, lo, hi);
	let samples = points.map((f) => sample(resp, f));
	let interiorArcs = 0;
	for (const { f, m } of roots.interior) {
		if (!(f > lo && f < hi)) continue;
		const before = sample(resp, f * (1 - 1e-7));
		const after = sample(resp, f * (1 + 1e-7), true);
		if (m > 0) interiorArcs += arcCrossings(before.phase, after.phase, m);
		samples = samples.filter((s) => Math.abs(s.f - f) > 1e-6 * f);
		samples.push(before, after);
		samples.sort((a, b) => a.f - b.f);
	}
	if (!measured || loop.factors.length > 0 || resp.delay > 0) samples = refine(resp, samples);
	return { samples, interiorArcs };
}

/**
 * Past the point where |L| has fallen below −40 dB for good, further phase crossovers of a
 * delayed loop only add gain margins beyond 40 dB; the band stops a little beyond there instead
 * of winding on (the grid's point budget bounds the work for very long delays). `reach` > 1
 * pushes the limit out, for a loop whose gain margin lies beyond it.
 */
function continuousTop(
	resp: LoopResponse,
	lo: number,
	hi: number,
	reach: number,
	caseGain: number
): number {
	// the features' band may end while |L| is still above the floor (a slow roll-off): look beyond.
	// The floor applies to the blocks without the case's gain, so that scaling a loop moves its
	// gain margins, never the list of phase crossovers.
	const coarse = logGrid(lo, hi * 1e4, 8);
	let last = coarse[0];
	const floor = Math.log((1e-2 * caseGain) / reach);
	for (const f of coarse) {
		resp.at(f);
		if (resp.lnMag >= floor) last = f;
	}
	// a biproper loop never falls below the floor: it keeps the features' band
	if (last === coarse[coarse.length - 1]) return hi;
	return Math.min(hi * 1e4, Math.max(4 * last, lo * 10));
}

/** Halves intervals (geometrically) until the phase moves < 60° and |L| < e× between points. */
function refine(resp: LoopResponse, samples: Sample[]): Sample[] {
	let cur = samples;
	for (let pass = 0; pass < 16 && cur.length < MAX_POINTS; pass++) {
		const next: Sample[] = [cur[0]];
		let added = 0;
		for (let i = 1; i < cur.length; i++) {
			const a = cur[i - 1];
			const b = cur[i];
			const coarse = Math.abs(b.phase - a.phase) > Math.PI / 3 || Math.abs(b.lnMag - a.lnMag) > 1;
			if (!b.jump && coarse && b.f > a.f * (1 + 1e-9) && cur.length + added < MAX_POINTS) {
				next.push(sample(resp, Math.sqrt(a.f * b.f)));
				added++;
			}
			next.push(b);
		}
		cur = next;
		if (added === 0) break;
	}
	return cur;
}

function integratorsFromSlope(samples: Sample[]): number {
	const u0 = Math.log(samples[0].f);
	const pts = samples.filter((s, i) => i < 2 || Math.log(s.f) - u0 <= 0.46);
	const n = pts.length;
	const mu = pts.reduce((s, p) => s + Math.log(p.f), 0) / n;
	const ml = pts.reduce((s, p) => s + p.lnMag, 0) / n;
	let sxy = 0;
	let sxx = 0;
	for (const p of pts) {
		const dx = Math.log(p.f) - mu;
		sxy += dx * (p.lnMag - ml);
		sxx += dx * dx;
	}
	return Math.max(0, Math.min(4, Math.round(-sxy / sxx)));
}

const signOf = (s: Sample, neighbour: Sample | undefined) => {
	const tiny = Math.abs(s.im) <= 1e-12 * hypot(s.re, s.im);
	return Math.sign(tiny && neighbour ? neighbour.im : s.im);
};

/** How the curve closes onto its mirror image at each end of the band. */
export function closures(
	loop: CaseLoop,
	resp: LoopResponse,
	roots: RootClasses,
	samples: Sample[]
): { low: Closure; high: Closure } {
	const first = samples[0];
	const last = samples[samples.length - 1];
	// measured data do not say how many integrators lie below the band: the slope does
	const mLow = loop.measured.length > 0 ? integratorsFromSlope(samples) : roots.low;
	const low: Closure =
		mLow >= 1
			? { kind: 'arc', crossings: arcCrossings(-first.phase, first.phase, mLow) }
			: { kind: 'chord', re: first.re, imSign: signOf(first, samples[1]), sign: 1 };
	const mHigh = loop.measured.length === 0 && resp.sampled ? roots.high : 0;
	const high: Closure =
		mHigh >= 1
			? { kind: 'arc', crossings: arcCrossings(last.phase, -last.phase, mHigh) }
			: { kind: 'chord', re: last.re, imSign: signOf(last, samples[samples.length - 2]), sign: -1 };
	return { low, high };
}
