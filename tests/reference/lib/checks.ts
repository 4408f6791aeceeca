/**
 * Checks of one engine result against direct evaluation of L, shared by the randomised tests.
 * They collect findings instead of stopping at the first, so one run lists every failing seed
 * with the numbers the engine author needs.
 */
import { appendFileSync } from 'node:fs';
import type { CaseResult } from '../../../src/lib/margins/types';
import { grid, pmOf, scan, sensitivityFigures, type Response } from './dense';
import { TWO_PI } from './engine';

/** Tolerance of "|L| = 1" and "∠L = −180°" at a reported crossover (relative, and rad). */
export const CROSSING_TOL = 1e-6;
/** Reported value against direct evaluation at the reported frequency (dB, deg). */
export const VALUE_TOL = 1e-6;
/** A dense-scan crossover and the engine's must sit at the same frequency to this (relative). */
export const MATCH_REL = 1e-6;

export class Findings {
	readonly items: string[] = [];
	fail(label: string, message: string) {
		this.items.push(`${label}: ${message}`);
	}
	near(
		label: string,
		what: string,
		actual: number | null | undefined,
		expected: number,
		tol: number
	) {
		if (typeof actual !== 'number' || !(Math.abs(actual - expected) <= tol))
			this.fail(label, `${what} = ${actual}, expected ${expected} ± ${tol.toExponential(1)}`);
	}
	rel(
		label: string,
		what: string,
		actual: number | null | undefined,
		expected: number,
		rel: number
	) {
		this.near(label, what, actual, expected, rel * Math.abs(expected) + 1e-300);
	}
	ok(label: string, condition: boolean, message: () => string) {
		if (!condition) this.fail(label, message());
	}
	/** Throws with the first findings and the total: a huge toEqual([]) diff would swamp the runner. */
	assertNone(shown = 60) {
		if (this.items.length === 0) return;
		// the full list, for whoever fixes the engine: REFERENCE_FINDINGS_FILE=/tmp/findings.txt
		const file = process.env.REFERENCE_FINDINGS_FILE;
		if (file) appendFileSync(file, this.items.join('\n') + '\n');
		const loops = new Set(this.items.map((i) => i.slice(0, i.indexOf(':'))));
		throw new Error(
			`${this.items.length} findings on ${loops.size} loops; the first ${Math.min(shown, this.items.length)}:\n` +
				this.items.slice(0, shown).join('\n')
		);
	}
}

export interface LoopUnderTest {
	/** Names the generator seed, kind and variant: enough to replay the loop. */
	label: string;
	/** Independent L(ω), ω in rad/s. */
	L: Response;
	ws: number[];
	sampleTimeSeconds?: number;
	/** L(0) is finite (no integrator): ω → 0 can be a phase crossover. */
	finiteAtZero: boolean;
	/** Dense phase crossovers with |L| below this are not required of the engine (delay tails). */
	phaseFloor?: number;
	/**
	 * False where the reference evaluation itself is not good to 1e-9 (a ZOH loop deep in its
	 * roll-off): crossovers there are neither verified nor required.
	 */
	trusted?: (w: number) => boolean;
	/**
	 * Where `trusted` says no: the same L in 60-digit arithmetic (precise.ts), slow, used only at
	 * the frequencies the engine reports.
	 */
	precise?: Response;
	/** True where L has a zero at that frequency (L = 0 is not "real and negative"). */
	zeroAt?: (w: number) => boolean;
}

/**
 * Phase crossovers deeper than this (GM > 180 dB) are not required of the engine: there |L| is a
 * rounding residue of its own evaluation, and no margin can come from them.
 */
export const DEEPEST = 1e-9;

const trusted = (t: LoopUnderTest, w: number) => !t.trusted || t.trusted(w);
/** L at one reported frequency: the double-precision reference, or the precise one where that is not good. */
const pointL = (t: LoopUnderTest, w: number) =>
	trusted(t, w) ? t.L(w) : t.precise ? t.precise(w) : null;

const angleDiff = (a: number, b: number) => ((((a - b) % 360) + 540) % 360) - 180;
const absL = (l: [number, number]) => Math.hypot(l[0], l[1]);

/** Every reported crossover really is one, and its value is L's at that frequency. */
export function directChecks(f: Findings, t: LoopUnderTest, c: CaseResult) {
	const nyquistHz = t.sampleTimeSeconds ? 1 / (2 * t.sampleTimeSeconds) : Infinity;
	const ascending = (xs: { hz: number }[]) => xs.every((x, i) => i === 0 || x.hz >= xs[i - 1].hz);
	f.ok(
		t.label,
		ascending(c.gainCrossovers) && ascending(c.phaseCrossovers),
		() => 'crossovers not in ascending hz'
	);
	for (const g of c.gainCrossovers) {
		const l = pointL(t, g.hz * TWO_PI);
		if (!l) continue;
		f.ok(
			t.label,
			Math.abs(absL(l) - 1) <= CROSSING_TOL && g.hz > 0 && g.hz <= nyquistHz * (1 + 1e-12),
			() => `gain crossover at ${g.hz} Hz has |L| = ${absL(l)}`
		);
		f.ok(
			t.label,
			Math.abs(angleDiff(g.phaseMarginDeg, pmOf(l))) <= VALUE_TOL,
			() => `PM at ${g.hz} Hz reported ${g.phaseMarginDeg}°, 180° + ∠L = ${pmOf(l)}°`
		);
	}
	for (const p of c.phaseCrossovers) {
		const l = pointL(t, p.hz * TWO_PI);
		if (!l) continue;
		if (!Number.isFinite(absL(l)) || (p.hz === 0 && !t.finiteAtZero)) {
			// a polynomial file states its integrator only to rounding (den(1) ≈ 1e-16): still an
			// integrator. Not "|L(0)| > 1e9": ZOH seed 300339 has L(0) = −4.25e13, finite (no pole at
			// s = 0; gain 5.2e30 over ten poles), and its 0 Hz crossover is right (80-digit check)
			f.fail(
				t.label,
				`phase crossover at 0 Hz (GM ${p.gainMarginDb} dB), but the loop has an integrator (|L(0)| = ${absL(l)}): L(0) is not finite`
			);
			continue;
		}
		if (t.zeroAt?.(p.hz * TWO_PI)) {
			f.fail(
				t.label,
				`phase crossover at ${p.hz} Hz (GM ${p.gainMarginDb} dB) sits on a zero of L: L = 0 is not real and negative`
			);
			continue;
		}
		if (absL(l) < DEEPEST) continue;
		const angleOff = Math.abs(Math.atan2(l[1], -l[0]));
		f.ok(
			t.label,
			l[0] < 0 && angleOff <= CROSSING_TOL && p.hz <= nyquistHz * (1 + 1e-12),
			() =>
				`phase crossover at ${p.hz} Hz has L = ${l[0]} ${l[1] >= 0 ? '+' : '−'} ${Math.abs(l[1])}j (∠L off −180° by ${angleOff} rad)`
		);
		f.ok(
			t.label,
			Math.abs(p.gainMarginDb + 20 * Math.log10(absL(l))) <= VALUE_TOL,
			() =>
				`GM at ${p.hz} Hz reported ${p.gainMarginDb} dB, −20·log10|L| = ${-20 * Math.log10(absL(l))} dB`
		);
	}
}

/** Every crossover a dense scan finds (and the ω → 0 / Nyquist end points) is in the engine's list. */
export function denseChecks(f: Findings, t: LoopUnderTest, c: CaseResult) {
	const d = scan(t.L, t.ws);
	const has = (list: { hz: number }[], w: number) =>
		list.some((x) => Math.abs(x.hz * TWO_PI - w) <= MATCH_REL * w);
	for (const g of d.gain.filter((x) => trusted(t, x.w)))
		f.ok(
			t.label,
			has(c.gainCrossovers, g.w),
			() =>
				`missed gain crossover at ${g.w / TWO_PI} Hz (PM ${g.pmDeg}°); engine has [${c.gainCrossovers.map((x) => x.hz)}]`
		);
	for (const p of d.phase) {
		if ((t.phaseFloor !== undefined && p.mag < t.phaseFloor) || p.mag < DEEPEST || !trusted(t, p.w))
			continue;
		f.ok(
			t.label,
			has(c.phaseCrossovers, p.w),
			() =>
				`missed phase crossover at ${p.w / TWO_PI} Hz (GM ${p.gmDb} dB); engine has [${c.phaseCrossovers.map((x) => x.hz)}]`
		);
	}
	if (t.finiteAtZero) {
		const l0 = t.L(0);
		if (l0[0] < 0 && absL(l0) >= DEEPEST)
			f.ok(
				t.label,
				c.phaseCrossovers.some((x) => x.hz <= 1e-9 * (t.ws[t.ws.length - 1] / TWO_PI)),
				() => `L(0) = ${l0[0]} < 0 but no phase crossover at 0 Hz`
			);
	}
	if (t.sampleTimeSeconds) {
		const wN = Math.PI / t.sampleTimeSeconds;
		const lN = t.L(wN);
		if (lN[0] < 0 && absL(lN) >= DEEPEST && !t.zeroAt?.(wN) && trusted(t, wN))
			f.ok(
				t.label,
				has(c.phaseCrossovers, wN),
				() => `L at Nyquist = ${lN[0]} < 0 but no phase crossover at ${wN / TWO_PI} Hz`
			);
	}
	return d;
}

/** Modulus margin and disk-margin α against dense minimisation; the disk formulas at the reported α. */
export function sensitivityChecks(f: Findings, t: LoopUnderTest, c: CaseResult, rel = 1e-6) {
	// the dense search only where the double-precision reference is good
	const dense = sensitivityFigures(t.L, t.trusted ? t.ws.filter((w) => trusted(t, w)) : t.ws);
	if (t.finiteAtZero) {
		// the grid starts just above ω = 0; the extremum may sit at the end point itself
		const l0 = t.L(0);
		dense.modulus = Math.min(dense.modulus, Math.hypot(1 + l0[0], l0[1]));
		dense.alpha = Math.min(
			dense.alpha,
			(2 * Math.hypot(1 + l0[0], l0[1])) / Math.hypot(1 - l0[0], l0[1])
		);
	}
	if (c.stable)
		f.ok(t.label, c.modulusMargin !== null, () => 'stable loop without a modulus margin');
	const at = c.peakSensitivityHz === null ? null : pointL(t, c.peakSensitivityHz * TWO_PI);
	if (c.modulusMargin !== null && at) {
		// ZOH seed 300339 (order 10, gain 5.2e30): at the peak, 433.9 Hz, the partial fractions of
		// zoh.ts cancel 13 digits (terms ~1e13, |L| 0.48) and gave |1 + L| = 0.8216; 80-digit
		// partial fractions and an 80-digit expm of the realisation (mpmath) both give 0.80089544301,
		// the engine's figure — hence the precise evaluation wherever zoh.ts is not trusted
		// the engine may find a sharper minimum than the grid: accept a lower value only if L confirms it
		f.rel(
			t.label,
			'modulus margin vs |1 + L| at its own frequency',
			c.modulusMargin,
			Math.hypot(1 + at[0], at[1]),
			rel
		);
		f.ok(
			t.label,
			c.modulusMargin <= dense.modulus * (1 + rel),
			() =>
				`modulus margin ${c.modulusMargin} above the dense minimum ${dense.modulus} (at ${dense.wModulus / TWO_PI} Hz)`
		);
		f.rel(
			t.label,
			'peak sensitivity = 1/modulus margin',
			c.peakSensitivity,
			1 / c.modulusMargin,
			1e-12
		);
	}
	if (!c.stable) {
		f.ok(t.label, c.diskMargin === null, () => 'unstable loop with a disk margin');
		return;
	}
	const disk = c.diskMargin;
	if (!disk) return f.fail(t.label, 'stable loop without a disk margin');
	let alpha = dense.alpha;
	if (disk.alpha < alpha * (1 - rel) && c.peakSensitivityHz) {
		// a peak sharper than the grid: look again, finely, around the engine's peak-sensitivity frequency
		const w0 = c.peakSensitivityHz * TWO_PI;
		alpha = Math.min(alpha, sensitivityFigures(t.L, grid(w0 * 0.98, w0 * 1.02, 200_000)).alpha);
	}
	f.rel(t.label, 'disk α vs dense', disk.alpha, alpha, rel);
	const a = disk.alpha;
	if (a >= 2)
		f.ok(t.label, disk.gainDb === null, () => `α = ${a} ≥ 2 but disk gain margin ${disk.gainDb}`);
	else
		f.near(
			t.label,
			'disk gain margin formula',
			disk.gainDb,
			20 * Math.log10((2 + a) / (2 - a)),
			1e-9
		);
	f.near(
		t.label,
		'disk phase margin formula',
		disk.phaseDeg,
		(2 * Math.atan(a / 2) * 180) / Math.PI,
		1e-9
	);
}
