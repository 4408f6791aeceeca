import numeric from 'numeric';
import { describe, expect, it } from 'vitest';
import { aberth } from '../../../src/lib/margins/aberth';
import { chebyshevRealRoots } from '../../../src/lib/margins/chebyshev';
import { continuousGainPoly, evenOdd } from '../../../src/lib/margins/crossover-polys';
import { gainPolyU, phasePolyU, shiftTo, thetaFromU } from '../../../src/lib/margins/shifted';
import { evalReal, fromRoots } from '../../../src/lib/margins/polynomial';
import { polyRoots, residual } from '../../../src/lib/margins/roots';

const sortedRe = (r: { re: Float64Array }) => Array.from(r.re).sort((a, b) => a - b);

function companion(desc: number[]): number[][] {
	const n = desc.length - 1;
	const a = Array.from({ length: n }, () => new Array<number>(n).fill(0));
	for (let j = 0; j < n; j++) a[0][j] = -desc[j + 1] / desc[0];
	for (let i = 1; i < n; i++) a[i][i - 1] = 1;
	return a;
}

describe('polynomial roots', () => {
	it('(x−1)…(x−6) to 1e-12, as numeric.eig does', () => {
		const r = polyRoots(fromRoots([1, 2, 3, 4, 5, 6], [0, 0, 0, 0, 0, 0]));
		sortedRe(r).forEach((x, i) => expect(Math.abs(x - (i + 1))).toBeLessThan(1e-11));
		expect(Array.from(r.im).every((v) => v === 0)).toBe(true);
	});

	it('the family xⁿ − c, on which numeric.eig throws "internal error"', () => {
		// the failure this guards against: plain numeric.eig on the companion matrix
		expect(() => numeric.eig(companion([1, 0, 0, 0, 0, 0, 0, 0, -2]))).toThrow(/internal error/);
		for (const n of [3, 4, 5, 8, 12, 20, 33, 60])
			for (const c of [2, -3, 1e-6, 1e6]) {
				const p = [-c, ...new Array<number>(n - 1).fill(0), 1];
				const r = polyRoots(p);
				const radius = Math.abs(c) ** (1 / n);
				expect(r.re.length).toBe(n);
				for (let k = 0; k < n; k++) {
					expect(Math.abs(Math.hypot(r.re[k], r.im[k]) - radius) / radius).toBeLessThan(1e-12);
					expect(residual(p, r.re[k], r.im[k])).toBeLessThan(1e-13);
				}
			}
	});

	it('roots at the origin are exact and closed forms cover degrees 1 and 2', () => {
		const r = sortedRe(polyRoots([0, 0, 6, -5, 1])); // x²(x−2)(x−3)
		expect(r.slice(0, 2)).toEqual([0, 0]);
		expect(r[2]).toBeCloseTo(2, 14);
		expect(r[3]).toBeCloseTo(3, 14);
		const q = polyRoots([5, 2, 1]); // −1 ± 2j
		expect(Array.from(q.re)).toEqual([-1, -1]);
		expect(Math.abs(q.im[0])).toBeCloseTo(2, 14);
		expect(q.im[0]).toBe(-q.im[1]);
	});

	it('a root at the origin beside roots only Aberth can improve: no crash, the large root right', () => {
		// x·(4e-15 + 4e-12 x + 4e8 x² − 5e-9 x³): coefficients over 23 decades; the polish once
		// handed Aberth start arrays one entry too long (the root at the origin) and threw
		const p = [0, 4e-15, 4e-12, 4e8, -5e-9];
		const r = polyRoots(p);
		expect(r.re.length).toBe(4);
		expect(Math.max(...r.re)).toBeCloseTo(8e16, -3);
		expect(Array.from(r.re).filter((x) => x === 0).length).toBeGreaterThanOrEqual(1);
	});

	it('a triple root comes back as a tight cluster (backward stable), conjugates exact', () => {
		const r = polyRoots(fromRoots([-1, -1, -1, -2], [0, 0, 0, 0]));
		const cluster = sortedRe(r).slice(1);
		cluster.forEach((x) => expect(Math.abs(x + 1)).toBeLessThan(1e-4));
		for (let i = 0; i < r.im.length; i++)
			if (r.im[i] !== 0) expect(Array.from(r.im).includes(-r.im[i])).toBe(true);
	});

	it('Aberth–Ehrlich on its own (the fallback) finds the same roots', () => {
		const p = fromRoots([0.5, -3, 7], [0, 2, 0]); // includes the pair −3 ± 2j
		const r = aberth(p);
		const got = Array.from(r.re)
			.map((x, i) => [x, r.im[i]])
			.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
		const want = [
			[-3, -2],
			[-3, 2],
			[0.5, 0],
			[7, 0]
		];
		got.forEach((g, i) =>
			expect(Math.hypot(g[0] - want[i][0], g[1] - want[i][1])).toBeLessThan(1e-12)
		);
	});
});

describe('crossover polynomials', () => {
	it('even/odd split: p(jω) = A(ω²) + jω·B(ω²)', () => {
		const p = [3, -1, 4, 1, -5, 9]; // ascending
		const [a, b] = evenOdd(p);
		const w = 0.7;
		let re = 0;
		let im = 0;
		for (let i = p.length - 1; i >= 0; i--) [re, im] = [-im * w + p[i], re * w];
		expect(evalReal(a, w * w)).toBeCloseTo(re, 13);
		expect(w * evalReal(b, w * w)).toBeCloseTo(im, 13);
	});

	it('the continuous gain polynomial vanishes exactly at |L| = 1', () => {
		// L = 24/((s+1)(s+2)(s+3)); |L(jω)| = 1 at ω = 2.0638515 (Octave control margin.m tests)
		const g = continuousGainPoly([24], [6, 11, 6, 1], 1);
		const w = 2.0638514580082465;
		expect(Math.abs(evalReal(g, w * w)) / 576).toBeLessThan(1e-12);
	});

	it('polynomials in u = |z − c|² reproduce g²|N|² − |D|² and Im(N·conj D)/sin θ on the circle', () => {
		const num = [0.2, -0.5, 1.3];
		const den = [-0.3, 0.1, 0.9, 1];
		const at = (p: number[], t: number) => {
			let re = 0;
			let im = 0;
			for (let i = p.length - 1; i >= 0; i--)
				[re, im] = [
					re * Math.cos(t) - im * Math.sin(t) + p[i],
					re * Math.sin(t) + im * Math.cos(t)
				];
			return [re, im];
		};
		for (const c of [1, -1] as const) {
			const n = shiftTo(num, c);
			const d = shiftTo(den, c);
			const G = gainPolyU(n, d, 1.7, c);
			const Q = phasePolyU(n, d, c);
			for (const t of [1e-4, 0.3, 1.5, 2.9]) {
				const [nr, ni] = at(num, t);
				const [dr, di] = at(den, t);
				const u = 2 - 2 * c * Math.cos(t);
				expect(evalReal(G, u)).toBeCloseTo(
					1.7 ** 2 * (nr * nr + ni * ni) - (dr * dr + di * di),
					10
				);
				expect(Math.sin(t) * evalReal(Q, u)).toBeCloseTo(ni * dr - nr * di, 10);
				expect(thetaFromU(u, c)).toBeCloseTo(t, 7);
			}
		}
	});

	it('the exact shift keeps a cluster at z = 1 that z-coefficients hold only in their last digits', () => {
		// (z − 1)(z − a)(z − b), a = 1 − 2⁻²⁰, b = 1 − 2⁻²¹ (all coefficients exact in binary):
		// shifted, w(w + 2⁻²⁰)(w + 2⁻²¹) = w³ + 3·2⁻²¹ w² + 2⁻⁴¹ w exactly
		const [a, b] = [1 - 2 ** -20, 1 - 2 ** -21];
		const z = [-a * b, a * b + a + b, -(1 + a + b), 1];
		expect(shiftTo(z, 1)).toEqual([0, 2 ** -41, 3 * 2 ** -21, 1]);
	});

	it('colleague-matrix roots of Chebyshev series (T and U kinds)', () => {
		const t5 = chebyshevRealRoots([0, 0, 0, 0, 0, 1], 'T').sort((a, b) => a - b);
		[9, 7, 5, 3, 1]
			.map((k) => Math.cos((k * Math.PI) / 10))
			.forEach((x, i) => expect(t5[i]).toBeCloseTo(x, 13));
		const u4 = chebyshevRealRoots([0, 0, 0, 0, 1], 'U').sort((a, b) => a - b);
		[4, 3, 2, 1]
			.map((k) => Math.cos((k * Math.PI) / 5))
			.forEach((x, i) => expect(u4[i]).toBeCloseTo(x, 13));
		// T_40 has 40 real roots in (−1, 1); a power-basis conversion would lose them
		const t40 = new Array<number>(41).fill(0);
		t40[40] = 1;
		expect(chebyshevRealRoots(t40, 'T').length).toBe(40);
	});
});
