/**
 * L at one frequency for any loop: the rational part from its roots, the transport delay and the
 * measured responses (interpolated linearly in log10 f: magnitude in dB, unwrapped phase).
 *
 * The phase is "natural": a sum of per-root angles, each continuous along the frequency axis, so
 * it needs no unwrapping on a grid and jumps only at roots on the boundary (by −180° per pole,
 * +180° per zero, the limit of a lightly damped stable root).
 */
import type { Factor } from './blocks';
import { polyRoots, wRoots, zRoots, type Roots } from './roots';
import type { CaseLoop, MeasuredData } from './loop';
import { hypot } from './hypot';
import { lowOrder, sumAbs, trim, type Poly } from './polynomial';
import { shiftTo } from './shifted';
import { typedParts } from './buffers';

const LN10_20 = Math.LN10 / 20;
const RAD = Math.PI / 180;

interface Interp {
	lx: Float64Array;
	db: Float64Array;
	ph: Float64Array;
}

export function loopRoots(loop: CaseLoop): { zeros: Roots; poles: Roots } {
	const sampled = loop.T !== null;
	return {
		zeros: collect(loop.factors.map((f) => zerosOf(f, sampled))),
		poles: collect(loop.factors.map((f) => polesOf(f, sampled)))
	};
}

// sampled factors with exact coefficients in w = z − 1 give their roots from those
function zerosOf(f: Factor, sampled: boolean): Roots {
	return (
		f.zeros ??
		(f.numW ? shiftedRoots(f.num, f.numW, true) : sampled ? zRoots(f.num, true) : polyRoots(f.num))
	);
}

function polesOf(f: Factor, sampled: boolean): Roots {
	return (
		f.poles ??
		(f.denW ? shiftedRoots(f.den, f.denW, false) : sampled ? zRoots(f.den) : polyRoots(f.den))
	);
}

/**
 * Roots of a sampled factor's polynomial from its exact w-coefficients. Roots exactly at z = 0
 * (zero trailing z-coefficients: a computational delay) come out exact: they are taken off the
 * z-coefficients before the shift, instead of reaching the root finder as a multiple root at
 * w = −1, which it can only split by rounding (and which costs it a QR fallback).
 */
function shiftedRoots(z: Poly, w: Poly, zeros: boolean): Roots {
	const k = lowOrder(z);
	if (k === 0 || k >= z.length - 1) return wRoots(w, zeros);
	// rounding is judged against the whole factor's coefficients, as without the split
	const size = sumAbs(w);
	const rest = wRoots(trim(shiftTo(z.slice(k), 1)), zeros, size);
	const n = rest.re.length;
	const [re, im, offRe] = typedParts(n + k, 3);
	offRe.fill(1);
	re.set(rest.re);
	im.set(rest.im);
	if (rest.offRe) offRe.set(rest.offRe);
	else for (let i = 0; i < n; i++) offRe[i] = 1 - rest.re[i];
	return { re, im, offRe, atOne: rest.atOne };
}

/** The factors' roots in one list (1 − r alongside, for sampled loops). */
function collect(parts: Roots[]): Roots {
	let n = 0;
	let atOne = 0;
	for (const r of parts) {
		n += r.re.length;
		atOne += r.atOne ?? 0;
	}
	const [re, im, offRe] = typedParts(n, 3);
	let o = 0;
	for (const r of parts) {
		re.set(r.re, o);
		im.set(r.im, o);
		for (let i = 0; i < r.re.length; i++) offRe[o + i] = r.offRe ? r.offRe[i] : 1 - r.re[i];
		o += r.re.length;
	}
	return { re, im, offRe, atOne };
}

export class LoopResponse {
	readonly sampled: boolean;
	readonly T: number | null;
	readonly zeros: Roots;
	readonly poles: Roots;
	/** L = lead · Π(x − z)/Π(x − p) · delay · measured. */
	readonly lead: number;
	/** Delay in seconds (continuous) or samples (sampled). */
	readonly delay: number;
	private readonly interp: Interp[];
	/** 1 − r for every root (sampled), precomputed so x − r near z = 1 loses nothing. */
	private readonly zOff: Float64Array;
	private readonly pOff: Float64Array;
	re = 0;
	im = 0;
	lnMag = 0;
	phase = 0;

	constructor(loop: CaseLoop, roots = loopRoots(loop)) {
		this.sampled = loop.T !== null;
		this.T = loop.T;
		this.zeros = roots.zeros;
		this.poles = roots.poles;
		this.lead = (loop.gain * loop.num[loop.num.length - 1]) / loop.den[loop.den.length - 1];
		this.delay = this.sampled ? loop.delaySamples : loop.delaySeconds;
		this.interp = loop.measured.map(toInterp);
		this.zOff = this.zeros.offRe ?? Float64Array.from(this.zeros.re, (x) => 1 - x);
		this.pOff = this.poles.offRe ?? Float64Array.from(this.poles.re, (x) => 1 - x);
	}

	/** Hz of an internal frequency (ω in rad/s, or θ in rad). */
	hz(f: number): number {
		return this.sampled ? f / (2 * Math.PI * (this.T as number)) : f / (2 * Math.PI);
	}

	internal(hz: number): number {
		return this.sampled ? 2 * Math.PI * hz * (this.T as number) : 2 * Math.PI * hz;
	}

	/** Distance from the point of the frequency axis to the nearest open-loop zero (relative in s). */
	zeroDistance(f: number): number {
		let best = Infinity;
		const z = this.zeros;
		for (let i = 0; i < z.re.length; i++) {
			const d = this.sampled
				? hypot(Math.cos(f) - z.re[i], Math.sin(f) - z.im[i])
				: hypot(z.re[i], f - z.im[i]) / Math.max(Math.abs(f), hypot(z.re[i], z.im[i]));
			best = Math.min(best, d);
		}
		return best;
	}

	at(f: number): void {
		// no closures here: this runs per point, and bundlers that keep function names wrap each one
		this.lnMag = Math.log(Math.abs(this.lead));
		this.phase = this.lead < 0 ? -Math.PI : 0;
		if (this.sampled) {
			sampledFactors(this, this.zeros, this.zOff, 1, f);
			sampledFactors(this, this.poles, this.pOff, -1, f);
		} else {
			continuousFactors(this, this.zeros, 1, f);
			continuousFactors(this, this.poles, -1, f);
		}
		this.phase -= this.delay * f;
		if (this.interp.length) {
			const x = Math.log10(this.hz(f));
			for (const m of this.interp) interpolate(this, m, x);
		}
		const mag = Math.exp(this.lnMag);
		this.re = mag * Math.cos(this.phase);
		this.im = mag * Math.sin(this.phase);
	}
}

/** Adds sign·(ln|jω − r|, ∠(jω − r)) over the roots, each angle on its own continuous branch. */
function continuousFactors(out: LoopResponse, roots: Roots, sign: number, f: number): void {
	let lm = 0;
	let ph = 0;
	for (let i = 0; i < roots.re.length; i++) {
		const a = -roots.re[i];
		const b = f - roots.im[i];
		lm += 0.5 * Math.log(a * a + b * b);
		ph += a >= 0 ? Math.atan2(b, a) : Math.PI - Math.atan2(b, -a);
	}
	out.lnMag += sign * lm;
	out.phase += sign * ph;
}

/** The same for e^{jθ} − r, written so that roots near z = 1 lose nothing to cancellation. */
function sampledFactors(
	out: LoopResponse,
	roots: Roots,
	off: Float64Array,
	sign: number,
	f: number
): void {
	const s = Math.sin(0.5 * f);
	// 1 − e^{−jθ} = 2 sin²(θ/2) + j sin θ; at the Nyquist frequency z = −1 exactly (sin π ≠ 0 in floating point)
	const er = 2 * s * s;
	const ei = f === Math.PI ? 0 : Math.sin(f);
	const c = Math.cos(f);
	let lm = 0;
	let ph = 0;
	for (let i = 0; i < roots.re.length; i++) {
		const rr = roots.re[i];
		const ri = roots.im[i];
		const mag2 = rr * rr + ri * ri;
		let ar: number;
		let ai: number;
		if (mag2 <= 1) {
			// e^{jθ} − r = e^{jθ}(1 − r e^{−jθ}), and 1 − r e^{−jθ} = (1 − r) + r(1 − e^{−jθ})
			ar = off[i] + rr * er - ri * ei;
			ai = -ri + rr * ei + ri * er;
			ph += f;
		} else {
			// e^{jθ} − r = −r (1 − e^{jθ}/r); the angle of −r for a real r > 1 is −π on both sides of θ = 0
			ar = 1 - (c * rr + ei * ri) / mag2;
			ai = -(ei * rr - c * ri) / mag2;
			ph += ri === 0 ? (rr > 0 ? -Math.PI : 0) : Math.atan2(-ri, -rr);
			lm += 0.5 * Math.log(mag2);
		}
		lm += 0.5 * Math.log(ar * ar + ai * ai);
		ph += Math.atan2(ai, ar);
	}
	out.lnMag += sign * lm;
	out.phase += sign * ph;
}

function toInterp(m: MeasuredData): Interp {
	const n = m.hz.length;
	const lx = new Float64Array(n);
	const db = new Float64Array(n);
	const ph = new Float64Array(n);
	for (let i = 0; i < n; i++) {
		lx[i] = Math.log10(m.hz[i]);
		db[i] = m.magnitudeDb[i];
		ph[i] = m.phaseDeg[i] * RAD;
	}
	return { lx, db, ph };
}

/** Adds the measured block's dB (as ln) and phase at log10 f = x, linear between its points. */
function interpolate(out: LoopResponse, m: Interp, x: number): void {
	const n = m.lx.length;
	let db: number;
	let ph: number;
	if (x <= m.lx[0]) [db, ph] = [m.db[0], m.ph[0]];
	else if (x >= m.lx[n - 1]) [db, ph] = [m.db[n - 1], m.ph[n - 1]];
	else {
		let lo = 0;
		let hi = n - 1;
		while (hi - lo > 1) {
			const mid = (lo + hi) >> 1;
			if (m.lx[mid] <= x) lo = mid;
			else hi = mid;
		}
		const t = (x - m.lx[lo]) / (m.lx[hi] - m.lx[lo]);
		db = m.db[lo] + t * (m.db[hi] - m.db[lo]);
		ph = m.ph[lo] + t * (m.ph[hi] - m.ph[lo]);
	}
	out.lnMag += db * LN10_20;
	out.phase += ph;
}
