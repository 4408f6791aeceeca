/**
 * A polynomial known only through its values, P(x) = D(x)·H(x) with D = Π(x − pᵢ) and H a
 * transfer function evaluated by linear algebra (so that D·H is a polynomial), recovered from
 * samples on a circle around `centre` by an inverse DFT: a unitary, hence well-conditioned, step.
 * Coefficients come out in powers of w = x − centre, accurate relative to the circle's radius:
 * centred at z = 1, a fast-sampled block keeps the digits that z-coefficients would lose.
 */
import { trim, type Poly } from './polynomial';
import type { Roots } from './roots';

export function fitOnCircle(
	count: number,
	centre: number,
	radius: number,
	poles: Roots,
	h: (xr: number, xi: number) => [number, number]
): Poly {
	const nD = poles.re.length;
	// pᵢ − centre, from the precise offsets when the centre is z = 1
	const qr = Float64Array.from(poles.re, (x, i) =>
		centre === 1 && poles.offRe ? -poles.offRe[i] : x - centre
	);
	// a rotation off the real axis keeps the samples away from real poles
	const offset = 0.3 + Math.PI / (2 * count);
	const sr = new Float64Array(count);
	const si = new Float64Array(count);
	let largest = 0;
	for (let k = 0; k < count; k++) {
		const t = offset + (2 * Math.PI * k) / count;
		const [ur, ui] = [Math.cos(t), Math.sin(t)];
		const [hr, hi] = h(centre + radius * ur, radius * ui);
		// D(x)/radius^nD = Π(u − qᵢ/radius)
		let dr = 1;
		let di = 0;
		for (let i = 0; i < nD; i++) {
			const fr = ur - qr[i] / radius;
			const fi = ui - poles.im[i] / radius;
			[dr, di] = [dr * fr - di * fi, dr * fi + di * fr];
		}
		sr[k] = hr * dr - hi * di;
		si[k] = hr * di + hi * dr;
		largest = Math.max(largest, Math.hypot(sr[k], si[k]));
	}
	// what the transform leaves where P has a structural zero is rounding: make it exact
	const noise = 16 * count * Number.EPSILON * largest;
	const out = new Array<number>(count).fill(0);
	for (let i = 0; i < count; i++) {
		let acc = 0;
		for (let k = 0; k < count; k++) {
			const t = -i * (offset + (2 * Math.PI * k) / count);
			acc += sr[k] * Math.cos(t) - si[k] * Math.sin(t);
		}
		acc /= count;
		out[i] = Math.abs(acc) <= noise ? 0 : acc * radius ** (nD - i);
	}
	return trim(out);
}

/** Π(w − (pᵢ − 1)) for the roots of a sampled factor, from their precise offsets 1 − pᵢ. */
export function fromOffsets(r: Roots): Poly {
	let p: Poly = [1];
	for (let i = 0; i < r.re.length; i++) {
		const a = r.offRe ? -r.offRe[i] : r.re[i] - 1;
		const b = r.im[i];
		if (b === 0) p = multiply(p, [-a, 1]);
		else if (b > 0) p = multiply(p, [a * a + b * b, -2 * a, 1]);
	}
	return p;
}

function multiply(a: Poly, b: Poly): Poly {
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
	return out;
}
