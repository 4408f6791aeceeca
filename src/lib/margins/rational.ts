/**
 * Margins of a rational loop (no continuous delay, no measured data): exact crossovers, stability
 * from the closed-loop poles, and a lean grid for the modulus and disk margins only.
 */
import { brentRoot } from './brent';
import {
	continuousCrossings,
	dedupe,
	ON_POLE,
	sampledCrossings,
	type Crossing,
	type RationalCrossings
} from './crossovers';
import type { CaseAnalysis } from './figures';
import { gainCandidates, gainInterval, type GainCandidate } from './gain-margins';
import { band, logGrid, withFeatures, type Feature } from './grid';
import type { CaseLoop } from './loop';
import { ContinuousEval, type LoopEval } from './rational-eval';
import { loopRoots } from './response';
import { loopForms } from './sampled-forms';
import { SampledEval } from './sampled-eval';
import { sensitivity, type EndPoint, type GridValues } from './sensitivity';
import { continuousClosedLoop, sampledClosedLoop, type ClosedLoop } from './stability';
import { hypot } from './hypot';
import { filled } from './buffers';

const PER_DECADE = 12;

export function rationalAnalysis(loop: CaseLoop): CaseAnalysis {
	let ev: LoopEval;
	let cross: RationalCrossings;
	let cl: ClosedLoop;
	let lInf = 0;
	if (loop.T === null) {
		const c = new ContinuousEval(loop.num, loop.den, loop.gain);
		ev = c;
		cross = continuousCrossings(c);
		cl = continuousClosedLoop(c, 1);
		lInf = c.atInfinity();
	} else {
		const { zeros, poles } = loopRoots(loop);
		const lead = (loop.gain * loop.num[loop.num.length - 1]) / loop.den[loop.den.length - 1];
		ev = new SampledEval(zeros, poles, lead);
		const forms = loopForms(loop);
		const w = forms.w;
		cross = sampledCrossings(ev, forms);
		cl = sampledClosedLoop(w.num, w.den, w.gain);
	}
	const grid = sensitivityGrid(
		ev,
		cl.poles,
		cross,
		loop.T === null ? (ev as ContinuousEval).w0 : 1
	);
	const values = evaluate(ev, grid);
	safetyNet(ev, grid, values, cross);
	const ends: EndPoint[] = [];
	const l0 = ev.atZero();
	if (!Number.isNaN(l0)) ends.push({ f: 0, re: Number.isFinite(l0) ? l0 : 1e300, im: 0 });
	if (!ev.sampled) ends.push({ f: Infinity, re: lInf, im: 0 });
	const sens = sensitivity(ev, grid, ends, values);
	const extra: GainCandidate[] = lInf < 0 ? [{ k: -1 / lInf, f: Infinity }] : [];
	const interval = cl.unstable === 0 ? gainInterval(gainCandidates(cross.phase, extra)) : null;
	return {
		name: loop.name,
		T: loop.T,
		gain: cross.gain,
		phase: cross.phase,
		unstablePoles: cl.unstable,
		interval,
		sensitivity: sens,
		closedLoopPoles: cl.poles
	};
}

/**
 * The band reaches well past the closed-loop poles and crossovers; narrow features of |1 + L| sit
 * at lightly damped closed-loop poles, so those get points of their own.
 */
export function sensitivityGrid(
	ev: LoopEval,
	poles: [number, number][],
	cross: RationalCrossings,
	w0: number
) {
	const features: Feature[] = [];
	const freqs: number[] = [];
	for (let i = 0; i < poles.length; i++) {
		const a = poles[i][0];
		const b = poles[i][1];
		if (ev.sampled) {
			// s·T = ln z
			const decay = 0.5 * Math.log(a * a + b * b);
			const centre = Math.abs(Math.atan2(b, a));
			features.push({ centre, decay });
			freqs.push(hypot(centre, decay));
		} else {
			features.push({ centre: Math.abs(b), decay: a });
			freqs.push(hypot(a, b));
		}
	}
	for (let i = 0; i < cross.gain.length; i++) freqs.push(cross.gain[i].f);
	for (let i = 0; i < cross.phase.length; i++) freqs.push(cross.phase[i].f);
	let [lo, hi] = band(freqs, 30, ev.sampled ? 0.1 : w0);
	if (ev.sampled) {
		hi = Math.PI;
		lo = Math.min(lo, Math.PI / 1000);
	}
	return withFeatures(logGrid(lo, hi, PER_DECADE), features, lo, hi);
}

export function evaluate(ev: LoopEval, grid: number[]): GridValues {
	const re = filled(grid.length);
	const im = filled(grid.length);
	for (let i = 0; i < grid.length; i++) {
		ev.value(grid[i]);
		re[i] = ev.re;
		im[i] = ev.im;
	}
	return { re, im };
}

/** How many of the crossings lie in (a, b]. */
function inside(list: Crossing[], a: number, b: number): number {
	let count = 0;
	for (const c of list) if (c.f > a && c.f <= b) count++;
	return count;
}

/**
 * The algebra is exact, but a grid costs little: a sign change of ln|L| or of Im L (with Re L < 0)
 * between two grid points that no crossover explains is refined by Brent and added.
 */
export function safetyNet(
	ev: LoopEval,
	grid: number[],
	{ re, im }: GridValues,
	cross: RationalCrossings
): void {
	const n = grid.length;
	// the sign of |L|² − 1 is all a bracket needs; logarithms only inside Brent
	const lm = filled(n);
	for (let i = 0; i < n; i++) lm[i] = re[i] * re[i] + im[i] * im[i] - 1;
	// as in sampledCrossings: far below |L(θ = π/2)| a crossing is a zero on the circle, moved by rounding
	let deep = 0;
	if (ev.sampled) {
		ev.at(Math.PI / 2);
		deep = 1e-12 * hypot(ev.re, ev.im);
	}
	const added: { gain: Crossing[]; phase: Crossing[] } = { gain: [], phase: [] };
	for (let i = 0; i + 1 < n; i++) {
		const a = grid[i];
		const b = grid[i + 1];
		if (lm[i] * lm[i + 1] < 0 && inside(cross.gain, a, b) % 2 === 0) {
			const u = brentRoot(
				(x) => {
					ev.at(Math.exp(x));
					return Math.log(hypot(ev.re, ev.im));
				},
				Math.log(a),
				Math.log(b)
			);
			ev.at(Math.exp(u));
			added.gain.push({ f: Math.exp(u), re: ev.re, im: ev.im });
		}
		if (im[i] * im[i + 1] < 0) {
			const t = im[i] / (im[i] - im[i + 1]);
			if (re[i] + t * (re[i + 1] - re[i]) >= 0 || inside(cross.phase, a, b) % 2 === 1) continue;
			const u = brentRoot(
				(x) => {
					ev.at(Math.exp(x));
					return ev.im / hypot(ev.re, ev.im);
				},
				Math.log(a),
				Math.log(b)
			);
			ev.at(Math.exp(u));
			if (
				ev.re < 0 &&
				ev.denRelative > ON_POLE &&
				ev.numRelative > ON_POLE &&
				hypot(ev.re, ev.im) > deep
			)
				added.phase.push({ f: Math.exp(u), re: ev.re, im: ev.im });
		}
	}
	if (added.gain.length) cross.gain = dedupe([...cross.gain, ...added.gain]);
	if (added.phase.length) cross.phase = dedupe([...cross.phase, ...added.phase]);
}
