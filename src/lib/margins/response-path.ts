/**
 * Margins of loops with a transport delay or measured data: crossovers by bracketing on an
 * adaptive grid (Brent-refined), stability and gain margins by the Nyquist count. Gain crossovers
 * of a delayed rational loop stay exact (the delay has |·| = 1).
 */
import { brentRoot } from './brent';
import {
	continuousCrossings,
	dedupe,
	ON_POLE,
	sampledCrossings,
	vanishesAtMinusOne,
	type Crossing,
	type SampledLoopForms
} from './crossovers';
import { loopForms } from './sampled-forms';
import type { Poly } from './polynomial';
import type { CaseAnalysis } from './figures';
import { gainCandidates, gainInterval, type GainCandidate } from './gain-margins';
import type { CaseLoop } from './loop';
import { unstableCount, type NyquistCount, type PhaseCrossing } from './nyquist';
import { ContinuousEval, type LoopEval } from './rational-eval';
import { SampledEval } from './sampled-eval';
import { buildGrid, classifyRoots, closures, type RootClasses, type Sample } from './response-grid';
import { LoopResponse } from './response';
import { withFeatures } from './grid';
import { sensitivity, type EndPoint } from './sensitivity';
import { hypot } from './hypot';

export function responseAnalysis(loop: CaseLoop): CaseAnalysis {
	const resp = new LoopResponse(loop);
	const measured = loop.measured.length > 0;
	const roots = classifyRoots(resp);
	// the rational part alone: its gain crossovers are the loop's (|delay| = 1)
	const rational: (LoopEval & { atZero(): number }) | null = measured
		? null
		: resp.sampled
			? new SampledEval(resp.zeros, resp.poles, resp.lead)
			: new ContinuousEval(loop.num, loop.den, loop.gain);
	const forms = rational && resp.sampled ? loopForms(loop) : null;
	const exact = rational
		? rational instanceof ContinuousEval
			? continuousCrossings(rational).gain
			: sampledCrossings(rational, forms as SampledLoopForms).gain
		: null;
	const numW = forms ? forms.w.num : [];
	let grid = buildGrid(loop, resp, roots);
	let phase = phaseCrossings(resp, grid.samples, rational, numW);
	let count = nyquistCount(loop, resp, roots, grid, phase, rational);
	const z = unstableCount(count, 1);
	const stable = z === 0;
	let interval = stable ? walk(count, phase) : null;
	// a delayed strictly proper loop always has a finite upper gain margin: look further out for it
	for (
		let reach = 100;
		interval &&
		!interval.high &&
		count.neutral === 0 &&
		!measured &&
		!resp.sampled &&
		resp.delay > 0 &&
		reach <= 1e6;
		reach *= 100
	) {
		grid = buildGrid(loop, resp, roots, reach);
		phase = phaseCrossings(resp, grid.samples, rational, numW);
		count = nyquistCount(loop, resp, roots, grid, phase, rational);
		interval = walk(count, phase);
	}
	const gain = exact ? exact.map((c) => withFull(resp, c.f)) : bracketGain(resp, grid.samples);
	const ends: EndPoint[] = [];
	if (rational) {
		const l0 = rational.atZero();
		if (Number.isFinite(l0)) ends.push({ f: 0, re: l0, im: 0 });
		if (rational instanceof ContinuousEval)
			ends.push({ f: Infinity, re: -Math.abs(rational.atInfinity()), im: 0 });
	}
	// |1 + L| dips where L passes −1, between a gain crossover and a phase crossing: both on the grid
	const freqs = withFeatures(
		grid.samples.map((s) => s.f),
		[],
		0,
		Infinity,
		[...gain, ...phase].map((c) => c.f).filter((f) => f > 0 && Number.isFinite(f))
	);
	return {
		name: loop.name,
		T: loop.T,
		gain,
		phase,
		unstablePoles: Number.isFinite(z) ? Math.abs(z) : Math.max(1, unstableCount(count, 0)),
		interval,
		sensitivity: sensitivity(resp, freqs, ends, undefined, { refine: 8, within: 3 }),
		measuredOnly: measured || undefined
	};
}

function phaseCrossings(
	resp: LoopResponse,
	samples: Sample[],
	rational: LoopEval | null,
	numW: Poly
): PhaseCrossing[] {
	let deep = 0;
	if (resp.sampled) {
		resp.at(Math.PI / 2);
		deep = 1e-12 * hypot(resp.re, resp.im);
	}
	const phase = bracketPhase(resp, samples).filter(
		(c) => resp.zeroDistance(c.f) > ON_POLE && hypot(c.re, c.im) > deep
	);
	if (rational) addEnds(resp, rational, numW, phase);
	return phase;
}

function nyquistCount(
	loop: CaseLoop,
	resp: LoopResponse,
	roots: RootClasses,
	grid: { samples: Sample[]; interiorArcs: number },
	phase: PhaseCrossing[],
	rational: LoopEval | null
): NyquistCount {
	return {
		P: roots.unstable + roots.hidden + loop.measuredUnstable,
		crossings: phase,
		interiorArcs: grid.interiorArcs,
		...closures(loop, resp, roots, grid.samples),
		neutral:
			rational instanceof ContinuousEval && resp.delay > 0 ? Math.abs(rational.atInfinity()) : 0
	};
}

function walk(count: NyquistCount, phase: PhaseCrossing[]) {
	const extra: GainCandidate[] = count.neutral > 0 ? [{ k: 1 / count.neutral, f: Infinity }] : [];
	return gainInterval(gainCandidates(phase, extra));
}

function withFull(resp: LoopResponse, f: number): Crossing {
	resp.at(f);
	return { f, re: resp.re, im: resp.im };
}

function bracketGain(resp: LoopResponse, samples: Sample[]): Crossing[] {
	const out: Crossing[] = [];
	for (let i = 0; i + 1 < samples.length; i++) {
		const [a, b] = [samples[i], samples[i + 1]];
		if (b.jump) continue;
		if (a.lnMag === 0) {
			out.push(withFull(resp, a.f));
			continue;
		}
		if (a.lnMag * b.lnMag >= 0) continue;
		const u = brentRoot(
			(x) => {
				resp.at(Math.exp(x));
				return resp.lnMag;
			},
			Math.log(a.f),
			Math.log(b.f),
			a.lnMag,
			b.lnMag
		);
		out.push(withFull(resp, Math.exp(u)));
	}
	const last = samples[samples.length - 1];
	if (last && last.lnMag === 0) out.push(withFull(resp, last.f));
	return dedupe(out);
}

/** Index of the odd multiple of π just below φ: crossing one changes it by one. */
const lineIndex = (phase: number) => Math.floor((phase - Math.PI) / (2 * Math.PI));

function bracketPhase(resp: LoopResponse, samples: Sample[]): PhaseCrossing[] {
	const out: PhaseCrossing[] = [];
	for (let i = 0; i + 1 < samples.length; i++) {
		const [a, b] = [samples[i], samples[i + 1]];
		if (b.jump) continue;
		const ia = lineIndex(a.phase);
		const ib = lineIndex(b.phase);
		if (ia === ib) continue;
		const dir = b.phase < a.phase ? 1 : -1;
		// one root per odd multiple of π passed (the grid keeps this to one almost always)
		for (let j = Math.min(ia, ib) + 1; j <= Math.max(ia, ib); j++) {
			const line = Math.PI + 2 * Math.PI * j;
			const u = brentRoot(
				(x) => {
					resp.at(Math.exp(x));
					return resp.phase - line;
				},
				Math.log(a.f),
				Math.log(b.f),
				a.phase - line,
				b.phase - line
			);
			const c = withFull(resp, Math.exp(u));
			out.push({ ...c, dir });
		}
	}
	out.sort((p, q) => p.f - q.f);
	return out;
}

/** The ω → 0 and Nyquist end points, where L is real: phase crossovers when negative. */
/** numW: the sampled loop's numerator in powers of w = z − 1. */
function addEnds(resp: LoopResponse, rational: LoopEval, numW: Poly, phase: PhaseCrossing[]): void {
	const l0 = rational.atZero();
	if (Number.isFinite(l0) && l0 < 0) phase.unshift({ f: 0, re: l0, im: 0, dir: 0, end: true });
	if (resp.sampled) {
		rational.at(Math.PI);
		const sign = resp.delay % 2 === 0 ? 1 : -1;
		const l = rational.re * sign;
		if (l < 0 && rational.denRelative > 1e-10 && !vanishesAtMinusOne(numW))
			phase.push({ f: Math.PI, re: l, im: 0, dir: 0, end: true });
	}
}
