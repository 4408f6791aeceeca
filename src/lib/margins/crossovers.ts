/**
 * Exact crossovers of rational loops: roots of the crossover polynomials, Newton-polished on L
 * itself and kept only when L confirms them. Near-real complex roots are tried as well, because
 * a tangent crossing (|L| touching 1) is a double root that rounding splits into a complex pair.
 */
import {
	continuousGainPoly,
	continuousPhasePoly,
	sampledGainSeries,
	sampledPhaseSeries
} from './crossover-polys';
import { gainPolyU, phasePolyU, shiftTo, thetaFromU } from './shifted';
import { maxAbs, rootBound, sumAbs, type Poly } from './polynomial';
import type { ContinuousEval, LoopEval } from './rational-eval';
import { chebyshevRealRoots } from './chebyshev';
import { polyRoots, type Roots } from './roots';
import { reflectedRoots } from './reflect';
import { loneRoot, segmentSignChanges, signChanges } from './descartes';
import { hypot } from './hypot';
import { sortSmall } from './small-sort';

/** A point of the frequency axis: f is ω in rad/s (continuous) or θ = ωT in rad (sampled). */
export interface Crossing {
	f: number;
	re: number;
	im: number;
}

const ACCEPT = 1e-9;
/** The segment [0, SEGMENT] certified root-free by Descartes covers the half circle's u ∈ [0, 2]. */
const SEGMENT = 2.5;
const NEAR_REAL = 1e-2;

/**
 * Descartes–Obreshkoff's count for the sector (hi = Infinity, from 0) or the lens over
 * [0, SEGMENT] that holds every root near the real axis in [lo, hi]; −1 when neither covers the
 * search or a sign is not sure. 0: no root there, no eigenvalues needed.
 */
function regionChanges(p: Poly, lo: number, hi: number): number {
	if (hi === Infinity) return lo === 0 ? signChanges(p) : -1;
	return lo > -1e-9 && hi < SEGMENT ? segmentSignChanges(p, SEGMENT) : -1;
}

/** changes: regionChanges of p over the search. */
const needsRoots = (p: Poly, changes: number): boolean =>
	p.length >= 2 && maxAbs(p) !== 0 && changes !== 0;

/**
 * The roots a real-root search in [lo, hi] must look at; null when there are none. When the
 * coefficients certify a single root in the searched sector or lens, that real root alone, found
 * by bracketing: no eigenvalues needed either. `changes`: regionChanges(p, lo, hi).
 */
function searchedRoots(
	p: Poly,
	lo: number,
	hi: number,
	changes = regionChanges(p, lo, hi)
): Roots | null {
	if (!needsRoots(p, changes)) return null;
	const x = lo >= 0 ? loneRoot(p, hi === Infinity ? hi : SEGMENT, changes) : null;
	return x === null ? polyRoots(p) : { re: Float64Array.of(x), im: Float64Array.of(0) };
}

function pushIn(out: number[], c: number, lo: number, hi: number): void {
	if (c >= lo && c <= hi) out.push(c);
}

/**
 * Real parts of the roots in [lo, hi] that are real or nearly so. Two close real roots (a nearly
 * tangent crossing) can come out of rounding as a pair x ± iy: x − y and x + y are tried as well,
 * and only L itself decides which candidates are crossings.
 */
function nearRealIn(r: Roots | null, lo: number, hi: number): number[] {
	const out: number[] = [];
	if (!r) return out;
	for (let i = 0; i < r.re.length; i++) {
		const x = r.re[i];
		const y = r.im[i];
		if (y < 0) continue; // its conjugate stands for the pair
		if (y > NEAR_REAL * Math.abs(x)) continue;
		// beyond 1e-3 the pair is no tangency: its real part alone is worth a look
		if (y === 0 || y > 1e-3 * Math.abs(x)) pushIn(out, x, lo, hi);
		else {
			pushIn(out, x - y, lo, hi);
			pushIn(out, x, lo, hi);
			pushIn(out, x + y, lo, hi);
		}
	}
	return out;
}

const realRootsIn = (p: Poly, lo: number, hi: number): number[] =>
	nearRealIn(searchedRoots(p, lo, hi), lo, hi);

/** True when p is zero up to rounding relative to the terms it was formed from. */
const vanishes = (p: Poly, scale: number) => maxAbs(p) <= 1e-13 * scale;

type Residual = (ev: LoopEval) => number;
const gainResidual: Residual = (ev) => 0.5 * Math.log(ev.re * ev.re + ev.im * ev.im);
const phaseResidual: Residual = (ev) => Math.atan2(-ev.im, -ev.re);

/** Relative distance beyond which a polished crossing no longer stands for its algebraic estimate. */
const WANDER_LIMIT = 1e-4;

/**
 * Newton on the residual in ln f (continuous, and low sampled frequencies) or in θ (the upper
 * half of the sampled band), with backtracking; returns the polished point and its residual.
 */
function polish(ev: LoopEval, f0: number, residual: Residual, phase: boolean): [number, number] {
	const logVar = !ev.sampled || f0 <= Math.PI / 2;
	const top = ev.sampled ? Math.PI : Infinity;
	let f = f0;
	ev.withSlope(f);
	let r = residual(ev);
	for (let it = 0; it < 12 && Math.abs(r) > 1e-15; it++) {
		let slope = phase ? ev.dim : ev.dre;
		if (ev.sampled && logVar) slope *= f;
		if (!Number.isFinite(slope) || slope === 0) break;
		let step = -r / slope;
		const cap = logVar ? 0.1 : 0.1 * Math.min(f, top - f + 1e-3);
		if (Math.abs(step) > cap) step = Math.sign(step) * cap;
		let improved = false;
		for (let back = 0; back < 4; back++) {
			const g = logVar ? f * Math.exp(step) : Math.min(top, Math.max(1e-300, f + step));
			// a step below the spacing of doubles leaves f where it is: no shorter one can move it
			if (g === f) break;
			ev.withSlope(g);
			const rg = residual(ev);
			if (Math.abs(rg) < Math.abs(r)) {
				f = g;
				r = rg;
				improved = true;
				break;
			}
			step *= 0.5;
		}
		// confirm() discards a polish that ends beyond WANDER_LIMIT of its start; one that has
		// gone a hundred times as far (typically a root where L is real and positive, walking
		// towards −180°) is not followed further
		if (!improved || Math.abs(f - f0) > 100 * WANDER_LIMIT * f0) break;
	}
	ev.at(f);
	return [f, Math.abs(residual(ev))];
}

/**
 * Phase crossings this close to an open-loop pole are its indentation arc, not a crossover; this
 * close to a zero, L = 0 is not "real and negative" (the phase there is rounding on an asymptote,
 * as at the zeros a Tustin map puts at z = −1).
 */
export const ON_POLE = 1e-7;

function confirm(
	ev: LoopEval,
	candidates: number[],
	residual: Residual,
	phase: boolean
): Crossing[] {
	const out: Crossing[] = [];
	for (const c of candidates) {
		if (!(c > 0) || !Number.isFinite(c)) continue;
		let [f, r] = polish(ev, c, residual, phase);
		if (Math.abs(f - c) > WANDER_LIMIT * c) {
			// Newton wandered (towards another root): judge the algebraic estimate on its own
			ev.at(c);
			[f, r] = [c, Math.abs(residual(ev))];
		}
		if (r > ACCEPT) continue;
		// ev is at f (polish leaves it there)
		if (phase && !(ev.re < 0 && ev.denRelative > ON_POLE && ev.numRelative > ON_POLE)) continue;
		out.push({ f, re: ev.re, im: ev.im });
	}
	return dedupe(out);
}

/**
 * N(−1) = 0 up to the rounding of N's coefficients (a Tustin zero at z = −1, written out, or a
 * fitted numerator's): then L is zero at the Nyquist frequency, whatever rounding leaves of it.
 * numW: N in powers of w = z − 1.
 */
export function vanishesAtMinusOne(numW: Poly): boolean {
	const a = shiftTo(numW, -2);
	return Math.abs(a[0]) <= 64 * Number.EPSILON * sumAbs(a);
}

/** Sorted, with points closer than 1e-9 relative merged. */
export function dedupe(list: Crossing[]): Crossing[] {
	sortSmall(list, (a, b) => a.f - b.f);
	const out: Crossing[] = [];
	for (const c of list) {
		const last = out[out.length - 1];
		if (!last || Math.abs(c.f - last.f) > 1e-9 * c.f) out.push(c);
	}
	return out;
}

export interface RationalCrossings {
	gain: Crossing[];
	/** Interior phase crossovers plus the ω = 0 and Nyquist end points where L is real and negative. */
	phase: Crossing[];
}

/** 2·|p_(n−1)/p_n|: rootBound's first term, so never more than rootBound(p). */
function firstBoundTerm(p: Poly): number {
	const n = p.length - 1;
	return n >= 1 ? 2 * Math.abs(p[n - 1] / p[n]) : 0;
}

export function continuousCrossings(ev: ContinuousEval): RationalCrossings {
	const n = ev.num;
	const d = ev.den;
	const g = ev.gain;
	const scale = g * g * maxAbs(n) ** 2 + maxAbs(d) ** 2;
	const G = continuousGainPoly(n, d, g);
	const H = continuousPhasePoly(n, d);
	const gainW = vanishes(G, scale) ? [] : realRootsIn(G, 0, Infinity).filter((w) => w > 0);
	const phaseW = vanishes(H, scale) ? [] : realRootsIn(H, 0, Infinity).filter((w) => w > 0);
	const w0 = ev.w0;
	const gain = confirm(
		ev,
		gainW.map((w) => w0 * Math.sqrt(w)),
		gainResidual,
		false
	);
	let phase = confirm(
		ev,
		phaseW.map((w) => w0 * Math.sqrt(w)),
		phaseResidual,
		true
	);
	if (phase.length) {
		// far beyond every root the phase only creeps towards its asymptote; a "crossing" out
		// there is that asymptote (−180°, relative degree 2) touched by rounding
		// the bound's first term alone clears the usual case without its roots of coefficients
		let last = 0;
		for (const c of phase) last = Math.max(last, c.f);
		const first = 1e4 * w0 * Math.max(firstBoundTerm(n), firstBoundTerm(d));
		if (!(first > 0 && last <= first)) {
			const beyond = 1e4 * w0 * Math.max(rootBound(n), rootBound(d));
			phase = phase.filter((c) => beyond === 0 || c.f <= beyond);
		}
	}
	const l0 = ev.atZero();
	if (Number.isFinite(l0) && l0 < 0) phase.unshift({ f: 0, re: l0, im: 0 });
	return { gain, phase };
}

/** Up to this order the shifted power basis is used (exact near z = ±1); above it, the colleague matrix. */
const POWER_BASIS_MAX = 12;

const fromY = (y: number) => 2 * Math.asin(Math.sqrt(Math.min(2, Math.max(0, y)) / 2));
const fromU = (u: number) => Math.PI - fromY(u);
/** θ = acos(x) without the loss of acos near x = ±1. */
const fromX = (x: number) => (x >= 0 ? fromY(1 - x) : fromU(1 + x));

/**
 * Candidate θ of the gain (|L| = 1) and phase (L real) crossings of g·N/D on the unit circle:
 * the lower half of the circle from the polynomials in u = |z − 1|², the upper half from those
 * in |z + 1|², each built on coefficients shifted exactly to its end. When both halves need
 * roots, the lower half's eigenvalues serve the upper half too (reflect.ts).
 */
function circleCandidates(numW: Poly, denW: Poly, g: number): { gain: number[]; phase: number[] } {
	const nV = shiftTo(numW, -2);
	const dV = shiftTo(denW, -2);
	const scaleW = (g * sumAbs(numW)) ** 2 + sumAbs(denW) ** 2;
	const scaleV = (g * sumAbs(nV)) ** 2 + sumAbs(dV) ** 2;
	// the two halves meet at u = 2; the end points themselves are judged separately
	const gain = bothHalves(
		gainPolyU(numW, denW, g, 1),
		gainPolyU(nV, dV, g, -1),
		[scaleW, scaleV],
		[1e-300, -1e-12]
	);
	const phase = bothHalves(
		phasePolyU(numW, denW, 1),
		phasePolyU(nV, dV, -1),
		[scaleW, scaleV],
		[1e-300, 1e-300]
	);
	return { gain, phase };
}

/** θ of the near-real roots of P₊ (lower half) and P₋ (upper half) in [lo, 2 + 1e-6]. */
function bothHalves(
	plus: Poly,
	minus: Poly,
	[scaleW, scaleV]: [number, number],
	[loW, loV]: [number, number]
): number[] {
	const HI = 2 + 1e-6;
	const rootsW = vanishes(plus, scaleW) ? null : searchedRoots(plus, loW, HI);
	// reflection needs all of P₊'s roots (not a lone one found by bracketing)
	const all = rootsW && rootsW.re.length === plus.length - 1 ? rootsW : null;
	const changesV = regionChanges(minus, loV, HI);
	const rootsV =
		vanishes(minus, scaleV) || !needsRoots(minus, changesV)
			? null
			: ((all && reflectedRoots(minus, all, plus.length - 1)) ??
				searchedRoots(minus, loV, HI, changesV));
	return [
		...nearRealIn(rootsW, loW, HI).map((u) => thetaFromU(u, 1)),
		...nearRealIn(rootsV, loV, HI).map((u) => thetaFromU(u, -1))
	];
}

/** The same from Chebyshev series in x = cos θ: well conditioned at any order. */
function seriesCandidates(num: Poly, den: Poly, g: number): { gain: number[]; phase: number[] } {
	const scale = g * g * maxAbs(num) ** 2 + maxAbs(den) ** 2;
	const cos = sampledGainSeries(num, den, g);
	const sin = sampledPhaseSeries(num, den);
	return {
		gain: vanishes(cos, scale) ? [] : chebyshevRealRoots(cos, 'T').map(fromX),
		phase: vanishes(sin, scale) ? [] : chebyshevRealRoots(sin.slice(1), 'U').map(fromX)
	};
}

/** L = gain·num/den, in z-coefficients and in w = z − 1 (sampled-forms.ts). */
export interface SampledLoopForms {
	z: { num: Poly; den: Poly; gain: number };
	w: { num: Poly; den: Poly; gain: number };
	/** The same without a whole-sample delay folded into den (|z^−k| = 1: same gain crossovers). */
	undelayed: { num: Poly; den: Poly; gain: number };
}

const orderOf = (f: { num: Poly; den: Poly }) => Math.max(f.num.length, f.den.length) - 1;

/** Low orders from the exact w-forms; high orders (a long folded delay) from z-coefficient Chebyshev series. */
function candidatesOf(forms: SampledLoopForms, which: 'w' | 'undelayed') {
	const w = forms[which];
	if (orderOf(w) <= POWER_BASIS_MAX) return circleCandidates(w.num, w.den, w.gain);
	const z =
		which === 'w' ? forms.z : { num: shiftTo(w.num, -1), den: shiftTo(w.den, -1), gain: w.gain };
	return seriesCandidates(z.num, z.den, z.gain);
}

export function sampledCrossings(ev: LoopEval, forms: SampledLoopForms): RationalCrossings {
	const full = candidatesOf(forms, 'w');
	const gainT = forms.undelayed === forms.w ? full.gain : candidatesOf(forms, 'undelayed').gain;
	const phaseT = full.phase.filter((t) => t > 1e-300 && t < Math.PI);
	const num = forms.w.num;
	// a scale-free yardstick: |L| far below its value at θ = π/2 is a zero on the circle that
	// rounding moved off it (a Tustin zero at z = −1), not a phase crossover
	ev.at(Math.PI / 2);
	const deep = 1e-12 * hypot(ev.re, ev.im);
	// |L| is even about θ = π, so Newton cannot polish a crossover sitting exactly there: test it directly
	ev.at(Math.PI);
	const nyquist: Crossing = { f: Math.PI, re: ev.re, im: 0 };
	const nyquistFinite = ev.denRelative > 1e-10;
	const nyquistNonzero = !vanishesAtMinusOne(num) && Math.abs(ev.re) > deep;
	const nyquistGain = nyquistNonzero && Math.abs(gainResidual(ev)) <= ACCEPT;
	const gainX = confirm(ev, gainT, gainResidual, false);
	const gainSet = gainX.filter((c) => Math.PI - c.f > 1e-7);
	if (nyquistGain || gainX.length > gainSet.length) gainSet.push(nyquist);
	const phase = confirm(ev, phaseT, phaseResidual, true).filter(
		(c) => Math.PI - c.f > 1e-7 && hypot(c.re, c.im) > deep
	);
	const l0 = ev.atZero();
	if (Number.isFinite(l0) && l0 < 0) phase.unshift({ f: 0, re: l0, im: 0 });
	if (nyquist.re < 0 && nyquistFinite && nyquistNonzero) phase.push(nyquist);
	return { gain: dedupe(gainSet), phase };
}
