/**
 * Brute-force frequency-domain reference: dense evaluation of L(jω) (or L(e^{jωT})) with
 * bisection refinement. Slow and simple on purpose — it shares no algorithm with the engine
 * (which works from polynomial roots), so agreement between the two means something.
 */
import type { Complex } from '../../../scripts/lib/loop-generator';

/** L at ω in rad/s. */
export type Response = (w: number) => Complex;

export interface DenseGain {
	w: number;
	pmDeg: number;
}
export interface DensePhase {
	w: number;
	gmDb: number;
	/** |L| there: callers ignore crossovers too deep in the roll-off to matter. */
	mag: number;
}

const abs = ([re, im]: Complex) => Math.hypot(re, im);

/** Phase margin of one gain crossover: 180° + ∠L wrapped to (−180°, 180°]. */
export function pmOf(l: Complex): number {
	const pm = 180 + (Math.atan2(l[1], l[0]) * 180) / Math.PI;
	return pm > 180 ? pm - 360 : pm;
}

/**
 * Log-spaced grid from lo to hi with `perDecade` points, never stepping more than `maxStep` rad/s
 * (a transport delay turns the phase at τ rad per rad/s: the step must follow it).
 */
export function grid(lo: number, hi: number, perDecade = 1000, maxStep = Infinity): number[] {
	const out: number[] = [];
	const ratio = Math.pow(10, 1 / perDecade);
	for (let w = lo; w < hi; w = Math.min(w * ratio, w + maxStep)) out.push(w);
	out.push(hi);
	return out;
}

function bisect(f: (w: number) => number, a: number, b: number): number {
	let fa = f(a);
	for (let i = 0; i < 200 && b - a > 1e-15 * b; i++) {
		const m = 0.5 * (a + b);
		const fm = f(m);
		if (fm === 0) return m;
		if (Math.sign(fm) === Math.sign(fa)) [a, fa] = [m, fm];
		else b = m;
	}
	return 0.5 * (a + b);
}

/**
 * Every sign change of log|L| (gain crossover) and of Im L with Re L < 0 (phase crossover) on the
 * grid, refined by bisection. The ω→0 and Nyquist end points are the caller's business.
 */
export function scan(L: Response, ws: number[]): { gain: DenseGain[]; phase: DensePhase[] } {
	const vals = ws.map(L);
	const gain: DenseGain[] = [];
	const phase: DensePhase[] = [];
	const logMag = (w: number) => Math.log(abs(L(w)));
	const sinArg = (w: number) => {
		const l = L(w);
		return l[1] / abs(l);
	};
	for (let i = 0; i + 1 < ws.length; i++) {
		const [a, b] = [vals[i], vals[i + 1]];
		if (Math.sign(Math.log(abs(a))) !== Math.sign(Math.log(abs(b)))) {
			const w = bisect(logMag, ws[i], ws[i + 1]);
			gain.push({ w, pmDeg: pmOf(L(w)) });
		}
		if (Math.sign(a[1]) !== Math.sign(b[1]) && (a[0] < 0 || b[0] < 0)) {
			const w = bisect(sinArg, ws[i], ws[i + 1]);
			const l = L(w);
			if (l[0] < 0) phase.push({ w, gmDb: -20 * Math.log10(abs(l)), mag: abs(l) });
		}
	}
	return { gain, phase };
}

/** Golden-section refinement of a local extremum of g between two grid neighbours. */
function golden(g: (w: number) => number, a: number, b: number, sign: 1 | -1): number {
	const r = (Math.sqrt(5) - 1) / 2;
	let c = b - r * (b - a);
	let d = a + r * (b - a);
	for (let i = 0; i < 200 && b - a > 1e-14 * b; i++) {
		if (sign * g(c) < sign * g(d)) b = d;
		else a = c;
		c = b - r * (b - a);
		d = a + r * (b - a);
	}
	return 0.5 * (a + b);
}

/** Minimum of g over the grid, each of the lowest local minima refined; returns [value, ω]. */
export function refinedMin(g: (w: number) => number, ws: number[]): [number, number] {
	const v = ws.map(g);
	const minima: number[] = [];
	for (let i = 0; i < ws.length; i++)
		if ((i === 0 || v[i] <= v[i - 1]) && (i === ws.length - 1 || v[i] <= v[i + 1])) minima.push(i);
	minima.sort((i, j) => v[i] - v[j]);
	let best: [number, number] = [v[minima[0]], ws[minima[0]]];
	for (const i of minima.slice(0, 8)) {
		if (i === 0 || i === ws.length - 1) continue;
		const w = golden(g, ws[i - 1], ws[i + 1], 1);
		const gw = g(w);
		if (gw < best[0]) best = [gw, w];
	}
	return best;
}

/** Modulus margin min |1 + L| and balanced disk-margin α = 1 / max |S − 1/2|, by dense search. */
export function sensitivityFigures(L: Response, ws: number[]) {
	const [modulus, wModulus] = refinedMin((w) => {
		const l = L(w);
		return Math.hypot(1 + l[0], l[1]);
	}, ws);
	// |S − 1/2| = |1 − L| / (2|1 + L|): minimise its reciprocal, which is α itself
	const [alpha] = refinedMin((w) => {
		const l = L(w);
		return (2 * Math.hypot(1 + l[0], l[1])) / Math.hypot(1 - l[0], l[1]);
	}, ws);
	return { modulus, wModulus, alpha };
}

/**
 * Closed-loop right-half-plane poles Z = N + P by the Nyquist criterion, counting the winding of
 * 1 + L along the grid (ω from ~0 to where |L| has fallen below 1/2 for good). Where the argument
 * jumps by more than 0.3 rad between neighbours (the curve passing close to −1) the interval is
 * subdivided, so a near-critical loop is still counted right. `integrators` poles at s = 0 are
 * passed by a small right indentation, whose image turns −integrators·π.
 */
export function nyquistUnstable(
	L: Response,
	ws: number[],
	integrators: number,
	openLoopUnstable: number
): number {
	const argOf = (w: number) => {
		const l = L(w);
		return Math.atan2(l[1], 1 + l[0]);
	};
	const wrap = (d: number) => (d > Math.PI ? d - 2 * Math.PI : d < -Math.PI ? d + 2 * Math.PI : d);
	const turnBetween = (w1: number, a1: number, w2: number, a2: number, depth: number): number => {
		const d = wrap(a2 - a1);
		if (Math.abs(d) < 0.3 || depth > 40) return d;
		const wm = 0.5 * (w1 + w2);
		const am = argOf(wm);
		return turnBetween(w1, a1, wm, am, depth + 1) + turnBetween(wm, am, w2, a2, depth + 1);
	};
	let turn = 0;
	let prevArg = argOf(ws[0]);
	for (let i = 1; i < ws.length; i++) {
		const arg = argOf(ws[i]);
		turn += turnBetween(ws[i - 1], prevArg, ws[i], arg, 0);
		prevArg = arg;
	}
	const total = 2 * turn - integrators * Math.PI;
	return Math.round(-total / (2 * Math.PI)) + openLoopUnstable;
}
