/**
 * Per-crossover comparison of one Octave `margin` answer with a crossover list (the engine's, or
 * the dense reference's when the allow-list is drawn up), with the direct evaluation of L that
 * says who is right when they differ.
 */
import {
	generateLoop,
	polyval,
	type Complex,
	type GeneratedLoop
} from '../../../scripts/lib/loop-generator';
import type { OctaveMargin } from '../../../scripts/lib/octave';
import type { CaseResult } from '../../../src/lib/margins/types';
import { TWO_PI } from './engine';
import { DEEPEST } from './checks';
import { scan } from './dense';
import { generatedResponse, ratio } from './response';
import { zohEvaluator } from './zoh';
import { makeSubject } from './subjects';

export const FREQ_REL = 1e-6;
/** Octave evaluates at its own root, good to ~1e-6 relative: the value may differ by slope × that. */
export const VALUE_TOL = 1e-4;
const CROSSING_TOL = 1e-6;

export type Reason =
	/** Octave reports no crossover of that kind, yet direct evaluation confirms every one the engine lists. */
	| 'octave-miss'
	/** At Octave's frequency L is not on the crossing to 1e-6: its polynomial root is inaccurate. */
	| 'octave-inaccurate-root'
	/** Octave's own c2d result crosses there, the true ZOH does not: its discretisation is inaccurate. */
	| 'octave-c2d';

const absL = (l: Complex) => Math.hypot(l[0], l[1]);
/** How far L is from the crossing: ||L| − 1|, or the angle (rad) from the negative real axis. */
const gainResidual = (l: Complex) => Math.abs(absL(l) - 1);
const phaseResidual = (l: Complex) => (l[0] < 0 ? Math.abs(Math.atan2(l[1], -l[0])) : Math.PI);
const angleDiff = (a: number, b: number) => ((((a - b) % 360) + 540) % 360) - 180;
const describeL = (l: Complex) =>
	`|L| = ${absL(l)}, ∠L = ${(Math.atan2(l[1], l[0]) * 180) / Math.PI}°`;

export interface Disagreement {
	key: string;
	detail: string;
	/** What direct evaluation shows; undefined when it points at the engine (never allowable). */
	reason?: Reason;
}

export function compare(
	loop: GeneratedLoop,
	o: OctaveMargin,
	c: Pick<CaseResult, 'gainCrossovers' | 'phaseCrossovers'>
): Disagreement[] {
	const L = generatedResponse(loop);
	// where even the reference cannot evaluate L to 1e-9 (deep in a ZOH loop's roll-off) nobody can
	// be shown right: such crossovers are left out of the comparison
	const zoh = loop.domain === 'zoh' ? zohEvaluator(loop) : undefined;
	const trusted = (w: number) => !zoh || zoh(w)[1] < 1e-9;
	const own = o.discretised
		? (w: number) => {
				const T = loop.sampleTimeSeconds!;
				const z: Complex = [Math.cos(w * T), Math.sin(w * T)];
				return ratio(polyval(o.discretised!.num, z), polyval(o.discretised!.den, z));
			}
		: L;
	const out: Disagreement[] = [];
	const sides = [
		{
			kind: 'gm',
			w: o.wgm,
			list: c.phaseCrossovers
				.filter((p) => p.hz > 0)
				.map((p) => ({ hz: p.hz, value: p.gainMarginDb })),
			octaveValue: 20 * Math.log10(o.gm),
			residual: phaseResidual,
			diff: (a: number, b: number) => a - b
		},
		{
			kind: 'pm',
			w: o.wpm,
			list: c.gainCrossovers.map((g) => ({ hz: g.hz, value: g.phaseMarginDeg })),
			octaveValue: o.pm,
			residual: gainResidual,
			diff: angleDiff
		}
	] as const;
	for (const s of sides) {
		const key = `${loop.seed}:${s.kind}`;
		// deeper than GM 180 dB is compared by nobody (see DEEPEST), nor where the reference cannot evaluate
		const deep = (db: number) => s.kind === 'gm' && db > -20 * Math.log10(DEEPEST);
		if (Number.isFinite(s.w) && (!trusted(s.w) || deep(s.octaveValue))) continue;
		const list = s.list.filter((x) => trusted(x.hz * TWO_PI) && !deep(x.value));
		const listed = list.map((x) => `${x.hz * TWO_PI} rad/s → ${x.value}`).join('; ') || 'none';
		if (!Number.isFinite(s.w)) {
			// Octave found none: fine if the engine found none either (ω = 0 is outside Octave's search)
			if (list.length === 0) continue;
			const allReal = list.every((x) => s.residual(L(x.hz * TWO_PI)) <= CROSSING_TOL);
			out.push({
				key,
				detail: `Octave: none; listed: ${listed}; direct: ${list.map((x) => describeL(L(x.hz * TWO_PI))).join('; ')}`,
				reason: allReal ? 'octave-miss' : undefined
			});
			continue;
		}
		const match = list.find((x) => Math.abs(x.hz * TWO_PI - s.w) <= FREQ_REL * s.w);
		if (match && Math.abs(s.diff(match.value, s.octaveValue)) <= VALUE_TOL) continue;
		const atOctave = L(s.w);
		const off = s.residual(atOctave);
		// a listed crossover a hair away that sits ten times closer to the crossing shows Octave's
		// root to be the imprecise one, even where its residual is inside the tolerance
		const near = list.find(
			(x) => Math.abs(x.hz * TWO_PI - s.w) <= 1e-4 * s.w && s.residual(L(x.hz * TWO_PI)) * 10 <= off
		);
		let reason: Reason | undefined;
		if (off > CROSSING_TOL || near)
			reason =
				o.discretised && s.residual(own(s.w)) <= CROSSING_TOL && !near
					? 'octave-c2d'
					: 'octave-inaccurate-root';
		out.push({
			key,
			detail: `Octave: ${s.octaveValue} at ${s.w} rad/s (direct there: ${describeL(atOctave)}); listed: ${listed}`,
			reason
		});
	}
	return out;
}

/** The loops of the Octave comparison: orders 1–10 in turn over continuous, z-domain and ZOH. */
export const OCTAVE_BASE_SEED = 20_000;
export const octaveLoops = (count = 240): GeneratedLoop[] =>
	Array.from({ length: count }, (_, i) =>
		generateLoop(OCTAVE_BASE_SEED + i, {
			domain: (['continuous', 'z', 'zoh'] as const)[i % 3],
			order: 1 + (Math.floor(i / 3) % 10)
		})
	);

/** The same loops as Octave receives them: expanded tf, or continuous tf for Octave's own c2d. */
export const toOctave = (loops: GeneratedLoop[]) =>
	loops.map((l, id) => ({
		id,
		num: l.num,
		den: l.den,
		sampleTimeSeconds: l.sampleTimeSeconds,
		c2d: l.domain === 'zoh' ? ('zoh' as const) : undefined
	}));

/** The dense reference's crossover lists, shaped like an engine case (Nyquist end point included). */
export function denseCrossovers(
	loop: GeneratedLoop
): Pick<CaseResult, 'gainCrossovers' | 'phaseCrossovers'> {
	const s = makeSubject(loop);
	const d = scan(s.t.L, s.t.ws);
	// as in the properties checks: nothing deeper than GM 180 dB (a zero of L is no crossover)
	const phaseCrossovers = d.phase
		.filter((p) => p.mag >= DEEPEST)
		.map((p) => ({ hz: p.w / TWO_PI, gainMarginDb: p.gmDb }));
	const T = loop.sampleTimeSeconds;
	if (T) {
		const l = s.t.L(Math.PI / T);
		if (l[0] < 0 && Math.hypot(l[0], l[1]) >= DEEPEST)
			phaseCrossovers.push({
				hz: 1 / (2 * T),
				gainMarginDb: -20 * Math.log10(Math.hypot(l[0], l[1]))
			});
	}
	return {
		gainCrossovers: d.gain.map((g) => ({ hz: g.w / TWO_PI, phaseMarginDeg: g.pmDeg })),
		phaseCrossovers
	};
}
