/**
 * L(jω) / L(e^{jωT}) computed here, never by the engine: the reference side of every randomised
 * comparison. Each representation is evaluated from exactly the numbers its model file carries:
 * roots for factored/sections/state-space files, and for a polynomial file its rounded
 * coefficients in double-double arithmetic — an expanded polynomial with clustered roots (a
 * sampled loop near z = 1) loses most of its digits in plain Horner, and the file, not the roots it
 * was made from, is what the engine is given.
 */
import {
	polyval,
	rootsResponse,
	type Complex,
	type GeneratedLoop
} from '../../../scripts/lib/loop-generator';
import { zohResponse } from './zoh';
import type { Response } from './dense';

export function ratio(l: Complex, m: Complex): Complex {
	const d = m[0] * m[0] + m[1] * m[1];
	return [(l[0] * m[0] + l[1] * m[1]) / d, (l[1] * m[0] - l[0] * m[1]) / d];
}

/** Continuous num/den response at s = jω. */
export function tfResponse(num: number[], den: number[]): Response {
	return (w) => ratio(polyval(num, [0, w]), polyval(den, [0, w]));
}

// double-double arithmetic (Dekker / Knuth): a value is hi + lo with |lo| ≤ ulp(hi)/2
type DD = [number, number];
const SPLIT = 134217729; // 2^27 + 1
function twoProd(a: number, b: number): DD {
	const p = a * b;
	const ca = SPLIT * a;
	const ah = ca - (ca - a);
	const al = a - ah;
	const cb = SPLIT * b;
	const bh = cb - (cb - b);
	const bl = b - bh;
	return [p, ah * bh - p + ah * bl + al * bh + al * bl];
}
function ddAdd(a: DD, b: DD): DD {
	const s = a[0] + b[0];
	const v = s - a[0];
	const e = a[0] - (s - v) + (b[0] - v) + a[1] + b[1];
	const hi = s + e;
	return [hi, e - (hi - s)];
}
const ddMul = (a: DD, b: number): DD => {
	const p = twoProd(a[0], b);
	return ddAdd(p, [a[1] * b, 0]);
};
const neg = (a: DD): DD => [-a[0], -a[1]];

/** Horner in double-double at a double-precision complex point; the result rounded to double. */
export function polyvalDD(p: number[], x: Complex): Complex {
	let re: DD = [0, 0];
	let im: DD = [0, 0];
	for (const c of p) {
		const r = ddAdd(ddAdd(ddMul(re, x[0]), neg(ddMul(im, x[1]))), [c, 0]);
		im = ddAdd(ddMul(re, x[1]), ddMul(im, x[0]));
		re = r;
	}
	return [re[0] + re[1], im[0] + im[1]];
}

/** L(jω) or L(e^{jωT}) of a generated loop as its model file states it; optional extra delay. */
export function generatedResponse(loop: GeneratedLoop, delaySeconds = 0): Response {
	const T = loop.sampleTimeSeconds;
	const point = (w: number): Complex =>
		loop.domain === 'z' ? [Math.cos(w * T!), Math.sin(w * T!)] : [0, w];
	let base: Response;
	if (loop.domain === 'zoh') base = zohResponse(loop);
	else if (loop.representation === 'polynomial') {
		// the very coefficients toLoopModel writes
		const num = loop.num.map((c) => c * loop.coefficientScale);
		const den = loop.den.map((c) => c * loop.coefficientScale);
		base = (w) => ratio(polyvalDD(num, point(w)), polyvalDD(den, point(w)));
	} else base = (w) => rootsResponse(loop, point(w));
	if (delaySeconds === 0) return base;
	return (w) => {
		const [re, im] = base(w);
		const c = Math.cos(w * delaySeconds);
		const s = -Math.sin(w * delaySeconds);
		return [re * c - im * s, re * s + im * c];
	};
}
