/**
 * Closed-loop stability of rational loops from the roots of the characteristic polynomial
 * D + k·g·N. Poles on the boundary (Re s = 0, |z| = 1, up to rounding) count as unstable: the
 * definition asks for Re < 0 / |z| < 1 strictly.
 */
import { add, scale, trim, type Poly } from './polynomial';
import { shiftTo } from './shifted';
import { hornerWithDerivative, type ContinuousEval } from './rational-eval';
import { polyRoots } from './roots';
import { hypot } from './hypot';
import { sortSmall } from './small-sort';

/** Relative margin inside which a computed pole is taken to be on the boundary. */
const BOUNDARY = 1e-10;

export interface ClosedLoop {
	unstable: number;
	/** Poles in s (1/s) or z, as [re, im]. */
	poles: [number, number][];
}

/** A continuous loop, on the evaluator's scaled coefficients (s = ω₀·x). */
export function continuousClosedLoop(ev: ContinuousEval, k: number): ClosedLoop {
	const r = polyRoots(add(ev.den, scale(ev.num, k * ev.gain)));
	let unstable = 0;
	const poles: [number, number][] = [];
	for (let i = 0; i < r.re.length; i++) {
		const size = hypot(r.re[i], r.im[i]);
		if (r.re[i] > -BOUNDARY * size || size === 0) unstable++;
		poles.push([r.re[i] * ev.w0, r.im[i] * ev.w0]);
	}
	return { unstable, poles: sorted(poles) };
}

/** Up to this order the roots are found in w = z − 1 directly, from exactly shifted coefficients. */
const SHIFTED_MAX = 12;

/**
 * A sampled loop, from its polynomials in w = z − 1. Its roots are found in w (for high orders:
 * in z, then re-polished in w when close to 1), so the distance of a pole near z = 1 to the unit
 * circle, |z|² − 1 = 2·Re w + |w|², is computed without cancellation.
 */
export function sampledClosedLoop(numW: Poly, denW: Poly, gain: number): ClosedLoop {
	const shifted = trim(add(denW, scale(numW, gain)));
	const n = shifted.length - 1;
	let wr: Float64Array;
	let wi: Float64Array;
	if (n <= SHIFTED_MAX) ({ re: wr, im: wi } = polyRoots(shifted));
	else {
		const r = polyRoots(shiftTo(shifted, -1));
		wr = r.re.map((x) => x - 1);
		wi = r.im;
		for (let i = 0; i < wr.length; i++)
			if (hypot(wr[i], wi[i]) < 0.5 / n) [wr[i], wi[i]] = newton(shifted, wr[i], wi[i]);
	}
	let unstable = 0;
	const poles: [number, number][] = [];
	for (let i = 0; i < wr.length; i++) {
		const size = hypot(wr[i], wi[i]);
		if (2 * wr[i] + wr[i] * wr[i] + wi[i] * wi[i] > -BOUNDARY * size || size === 0) unstable++;
		poles.push([1 + wr[i], wi[i]]);
	}
	return { unstable, poles: sorted(poles) };
}

function newton(p: Poly, xr: number, xi: number): [number, number] {
	for (let it = 0; it < 4; it++) {
		const [pr, pi, dr, di] = hornerWithDerivative(p, xr, xi);
		const d = dr * dr + di * di;
		if (d === 0) break;
		const sr = (pr * dr + pi * di) / d;
		const si = (pi * dr - pr * di) / d;
		if (!Number.isFinite(sr) || hypot(sr, si) > 0.1 * hypot(xr, xi)) break;
		xr -= sr;
		xi = xi === 0 ? 0 : xi - si;
	}
	return [xr, xi];
}

const sorted = (poles: [number, number][]) =>
	sortSmall(poles, (p, q) => p[0] - q[0] || p[1] - q[1]);
