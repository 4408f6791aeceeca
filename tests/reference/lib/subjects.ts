/**
 * Generated loops dressed for the randomised tests: the model file the engine reads, an
 * independent L(ω), a dense grid that brackets every crossover, and an independent stability
 * test at any gain (Routh–Hurwitz, or a Nyquist count for sampled and delayed loops).
 */
import {
	generateLoop,
	mulberry32,
	rootsResponse,
	toLoopModel,
	type GeneratedLoop,
	type LoopDomain
} from '../../../scripts/lib/loop-generator';
import { characteristic, routhUnstable } from './stability';
import { grid, nyquistUnstable, type Response } from './dense';
import { generatedResponse } from './response';
import { zohEvaluator } from './zoh';
import { preciseUnstableZ, preciseZoh } from './precise';
import type { LoopUnderTest } from './checks';

export interface Subject {
	loop: GeneratedLoop;
	model: Record<string, unknown>;
	t: LoopUnderTest;
	delaySeconds: number;
	/** Closed-loop poles with Re ≥ 0 (or |z| ≥ 1) of k·L, computed here; null if ambiguous. */
	unstableAt: (k: number) => number | null;
	rng: () => number;
}

/** Grid density: a 0.05-damped resonance still spans a dozen points. */
const PER_DECADE = 400;
/**
 * A delayed loop has infinitely many phase crossovers, ever deeper in the roll-off; the engine is
 * required to list those with |L| ≥ 1e-2 (gain margins up to 40 dB), which is where a margin can come from.
 */
export const PHASE_FLOOR = 1e-2;

const integrators = (loop: GeneratedLoop) =>
	loop.sections
		.flatMap((s) => s.poles)
		.filter(([re, im]) => im === 0 && re === (loop.domain === 'z' ? 1 : 0)).length;

const rootMagnitudes = (loop: GeneratedLoop) =>
	loop.sections
		.flatMap((s) => [...s.poles, ...s.zeros])
		.map(([re, im]) => Math.hypot(re, im))
		.filter((m) => m > 0);

const zerosOf = (loop: GeneratedLoop) => loop.sections.flatMap((s) => s.zeros);

export const relativeDegree = (loop: GeneratedLoop) =>
	loop.sections.reduce((n, s) => n + s.poles.length - s.zeros.length, 0);

/** Continuous grid: four decades beyond every root, or for a delayed loop up to where |L| < floor for good. */
function continuousGrid(loop: GeneratedLoop, delay: number, floor: number): number[] {
	const mags = rootMagnitudes(loop);
	const lo = Math.min(...mags, loop.targetCrossover) / 1e4;
	let hi = Math.max(...mags, loop.targetCrossover) * 1e4;
	if (delay === 0) return grid(lo, hi, PER_DECADE);
	if (relativeDegree(loop) < 1)
		throw new Error(`${loop.seed}: a delayed proper loop never rolls off; no finite grid`);
	// beyond the last root |L| only falls: walk up until it is below the floor
	hi = Math.max(...mags, loop.targetCrossover) * 2;
	while (Math.hypot(...rootsResponse(loop, [0, hi])) >= floor && hi < 1e8 * loop.targetCrossover)
		hi *= 1.2;
	return grid(lo, hi, PER_DECADE, 0.2 / delay);
}

export function makeSubject(loop: GeneratedLoop, delaySeconds = 0): Subject {
	const T = loop.sampleTimeSeconds;
	const L: Response = generatedResponse(loop, delaySeconds);
	const model = toLoopModel(loop, delaySeconds > 0 ? { delaySeconds } : {});
	const ints = integrators(loop);
	const ws = T
		? grid((Math.PI / T) * 1e-6, Math.PI / T, PER_DECADE)
		: continuousGrid(loop, delaySeconds, PHASE_FLOOR / 2);
	const label = `${loop.domain} seed ${loop.seed} order ${loop.order} ${loop.representation}${delaySeconds ? ` delay ${delaySeconds}` : ''}`;
	const bound = loop.domain === 'zoh' ? zohEvaluator(loop) : undefined;
	const t: LoopUnderTest = {
		label,
		L,
		ws,
		sampleTimeSeconds: T,
		finiteAtZero: ints === 0,
		phaseFloor: delaySeconds > 0 && !T ? PHASE_FLOOR : undefined,
		trusted: bound && ((w) => bound(w)[1] < 1e-9),
		precise: loop.domain === 'zoh' ? preciseZoh(loop) : undefined,
		zeroAt: (w) => {
			const x: [number, number] =
				loop.domain === 'z' ? [Math.cos(w * T!), Math.sin(w * T!)] : [0, w];
			return (
				loop.domain !== 'zoh' &&
				zerosOf(loop).some(
					([re, im]) => Math.hypot(x[0] - re, x[1] - im) <= 1e-9 * Math.max(1, Math.hypot(re, im))
				)
			);
		}
	};
	let unstableAt: (k: number) => number | null;
	if (loop.domain === 'z' && loop.representation === 'polynomial' && delaySeconds === 0) {
		// The file's own coefficients, counted exactly (precise.ts). A double integrator written out
		// in z-coefficients is split by their rounding into a pair ~1e-7 off z = 1 (seed 200273:
		// 1 + 2.9e-13 ± 2.99e-7j, just outside the circle): L of the file is then finite at z = 1,
		// resonant at θ ≈ 3e-7 and crosses −180° at θ ≈ 1e-6 — all below the first grid point
		// (θ = π·1e-6), so a Nyquist count from the grid with two ideal integrators went wrong
		// whenever |k·L| there is not ≫ 1 (k ~ 1e-9). 80-digit roots (mpmath) of den + k·num
		// agree with this count and with the engine: the pair crosses |z| = 1 at
		// k = 1/|L(θ_pc)| = 1.0355718e-9 (the engine's lower margin, −179.696395 dB).
		const fileNum = loop.num.map((c) => c * loop.coefficientScale);
		const fileDen = loop.den.map((c) => c * loop.coefficientScale);
		unstableAt = (k) => preciseUnstableZ(fileNum, fileDen, k);
	} else if (T || delaySeconds > 0) {
		// Nyquist count on the accurate response: for a sampled loop over 0 < ω ≤ π/T (the same
		// formula, the unit circle taking the place of the imaginary axis). The expanded z-polynomial
		// a Schur test would need loses its digits when the roots crowd near z = 1.
		unstableAt = (k) => {
			// the winding count needs the curve followed until |kL| < 1/2 for good
			const wk = T ? ws.slice() : continuousGrid(loop, delaySeconds, 0.25 / Math.max(k, 1));
			// start at ω = 0 itself when L(0) is finite: 1 + L(0) may be a hair from 0
			if (ints === 0) wk.unshift(0);
			return nyquistUnstable(
				(w) => {
					const [re, im] = L(w);
					return [k * re, k * im];
				},
				wk,
				ints,
				0
			);
		};
	} else
		unstableAt = (k) =>
			routhUnstable(
				characteristic(
					loop.num.map((c) => c * k),
					loop.den
				)
			);
	return { loop, model, t, delaySeconds, unstableAt, rng: mulberry32(loop.seed ^ 0x9e3779b9) };
}

export const SEEDS: Record<LoopDomain, number> = { continuous: 100_000, z: 200_000, zoh: 300_000 };

/** `count` loops of one domain, orders 1–10 in turn; `accept` filters (the seed just moves on). */
export function subjects(
	domain: LoopDomain,
	count: number,
	base = SEEDS[domain],
	accept: (l: GeneratedLoop) => boolean = () => true
): GeneratedLoop[] {
	const out: GeneratedLoop[] = [];
	for (let i = 0; out.length < count; i++) {
		const loop = generateLoop(base + i, { domain, order: 1 + (out.length % 10) });
		if (accept(loop)) out.push(loop);
	}
	return out;
}
