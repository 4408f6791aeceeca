import { describe, expect, it } from 'vitest';
import { fromRoots, type Poly } from '../../../src/lib/margins/polynomial';
import { reflectedRoots } from '../../../src/lib/margins/reflect';
import { gainPolyU, phasePolyU, shiftTo } from '../../../src/lib/margins/shifted';
import { polyRoots } from '../../../src/lib/margins/roots';

/** q(x) = p(4 − x), ascending coefficients (binomial expansion; exact for small integers). */
function reflect(p: Poly): Poly {
	const out = new Array<number>(p.length).fill(0);
	for (let i = 0; i < p.length; i++) {
		// (4 − x)^i = Σ_k C(i, k) 4^(i−k) (−x)^k
		let binom = 1;
		for (let k = 0; k <= i; k++) {
			out[k] += p[i] * binom * 4 ** (i - k) * (k % 2 ? -1 : 1);
			binom = (binom * (i - k)) / (k + 1);
		}
	}
	return out;
}

const sorted = (r: { re: Float64Array; im: Float64Array }) =>
	Array.from(r.re, (x, i) => [x, r.im[i]]).sort((a, b) => a[0] - b[0] || a[1] - b[1]);

describe('roots of the upper-half polynomial from the lower half’s (reflect.ts)', () => {
	it('P₋(u′) = P₊(4 − u′): the twins of the roots with Re u ≥ 1.5, to rounding', () => {
		// dyadic roots, so that P₊ and P₋ are both exact in binary: P₊ has 0.5, 1.25, 3, 3.875 and
		// 2.5 ± 0.125j; the twins of those with Re u ≥ 1.5 are 1, 0.125 and 1.5 ∓ 0.125j
		const plus = fromRoots([0.5, 1.25, 3, 3.875, 2.5, 2.5], [0, 0, 0, 0, 0.125, -0.125]);
		const r = reflectedRoots(reflect(plus), polyRoots(plus), 6);
		expect(r).not.toBeNull();
		const want = [
			[0.125, 0],
			[1, 0],
			[1.5, -0.125],
			[1.5, 0.125]
		];
		const got = sorted(r!);
		expect(got.length).toBe(want.length);
		got.forEach(([x, y], i) => {
			expect(Math.abs(x - want[i][0])).toBeLessThan(1e-13);
			expect(Math.abs(y - want[i][1])).toBeLessThan(1e-13);
		});
		// exact conjugates, and real roots exactly real
		expect(got[2][1]).toBe(-got[3][1]);
		expect(got[0][1]).toBe(0);
	});

	it('matches the eigenvalues of the real upper-half crossover polynomials of a sampled loop', () => {
		const num = [0.2, -0.5, 1.3];
		const den = [-0.3, 0.1, 0.9, 1];
		const [nW, dW] = [shiftTo(num, 1), shiftTo(den, 1)];
		const [nV, dV] = [shiftTo(num, -1), shiftTo(den, -1)];
		for (const [plus, minus] of [
			[gainPolyU(nW, dW, 1.7, 1), gainPolyU(nV, dV, 1.7, -1)],
			[phasePolyU(nW, dW, 1), phasePolyU(nV, dV, -1)]
		]) {
			const rp = polyRoots(plus);
			const r = reflectedRoots(minus, rp, plus.length - 1);
			expect(r).not.toBeNull();
			const direct = polyRoots(minus);
			// every certified root is one of P₋'s own, and every root of P₋ with Re ≤ 2.5 is there
			for (const [x, y] of sorted(r!)) {
				const d = Math.min(...sorted(direct).map(([a, b]) => Math.hypot(a - x, b - y)));
				expect(d).toBeLessThan(1e-12);
			}
			const near = sorted(direct).filter(([a]) => a <= 2.5);
			expect(near.length).toBe(sorted(r!).filter(([a]) => a <= 2.5).length);
		}
	});

	it('refuses what it cannot certify: a double root, a degree mismatch', () => {
		// P₊ = (u − 3)²(u − 1): P₋ has the double root u′ = 1, no disjoint discs
		const plus = fromRoots([3, 3, 1], [0, 0, 0]);
		expect(reflectedRoots(reflect(plus), polyRoots(plus), 3)).toBeNull();
		const simple = fromRoots([3, 1], [0, 0]);
		expect(reflectedRoots([1, 2, 3, 4], polyRoots(simple), 2)).toBeNull();
	});
});
