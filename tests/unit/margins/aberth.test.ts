import { describe, expect, it } from 'vitest';
import { certifiedAberth } from '../../../src/lib/margins/aberth';
import { fromRoots } from '../../../src/lib/margins/polynomial';
import { polyRoots, residual } from '../../../src/lib/margins/roots';

type Root = [number, number];

/** Every wanted root matched by a distinct found one within tol (relative to its modulus). */
function expectRoots(re: ArrayLike<number>, im: ArrayLike<number>, want: Root[], tol: number) {
	expect(re.length).toBe(want.length);
	const used = new Set<number>();
	for (const [wr, wi] of want) {
		let best = -1;
		let bestD = Infinity;
		for (let k = 0; k < re.length; k++) {
			if (used.has(k)) continue;
			const d = Math.hypot(re[k] - wr, im[k] - wi);
			if (d < bestD) [best, bestD] = [k, d];
		}
		used.add(best);
		expect(bestD / Math.max(Math.hypot(wr, wi), 1e-300)).toBeLessThan(tol);
	}
}

const polyOf = (roots: Root[]) =>
	fromRoots(
		roots.map((r) => r[0]),
		roots.map((r) => r[1])
	);

function fast(roots: Root[]) {
	const p = polyOf(roots);
	const n = p.length - 1;
	const re = new Float64Array(n);
	const im = new Float64Array(n);
	return { p, ok: certifiedAberth(p, re, im), re, im };
}

const pair = (re: number, im: number): Root[] => [
	[re, im],
	[re, -im]
];

describe('Aberth–Ehrlich from Newton-polygon starts (certifiedAberth)', () => {
	it('well separated real roots and pairs: certified, to rounding', () => {
		const want: Root[] = [[-0.5, 0], [2, 0], [7, 0], ...pair(-3, 2), ...pair(0.1, 4)];
		const { ok, re, im } = fast(want);
		expect(ok).toBe(true);
		expectRoots(re, im, want, 1e-13);
	});

	it('roots over eighteen decades start on their own circles and are all found', () => {
		const want: Root[] = [[-1e-9, 0], [-1e-5, 0], [-1, 0], ...pair(-1e3, 3e3), [-1e9, 0]];
		const { ok, re, im } = fast(want);
		expect(ok).toBe(true);
		expectRoots(re, im, want, 1e-12);
	});

	it('roots on the unit circle beside z = 1 and z = −1: certified, to rounding', () => {
		const t = 0.05;
		const want: Root[] = [
			...pair(Math.cos(t), Math.sin(t)),
			[1, 0],
			[-1, 0],
			...pair(-Math.cos(t), Math.sin(t)),
			...pair(0.9 * Math.cos(1), 0.9 * Math.sin(1))
		];
		const { ok, re, im } = fast(want);
		expect(ok).toBe(true);
		expectRoots(re, im, want, 1e-12);
	});

	it('a cluster at z = 1 as z-coefficients (conditioned at ~1e-4): no worse than its conditioning', () => {
		// five roots within 2e-3 of z = 1: the coefficients' rounding alone moves them by ~1e-4;
		// the engine avoids this form by shifting to w = z − 1 first
		const e = 1e-3;
		const want: Root[] = [
			...pair(Math.cos(e), Math.sin(e)),
			...pair(0.999 * Math.cos(2 * e), 0.999 * Math.sin(2 * e)),
			[1, 0],
			[-1, 0],
			...pair(-Math.cos(3 * e), Math.sin(3 * e))
		];
		const { p, ok, re, im } = fast(want);
		if (ok) expectRoots(re, im, want, 1e-3);
		const r = polyRoots(p);
		expectRoots(r.re, r.im, want, 1e-3);
		for (let k = 0; k < r.re.length; k++) expect(residual(p, r.re[k], r.im[k])).toBeLessThan(1e-13);
	});

	it('the same cluster shifted to w = z − 1 keeps its relative precision', () => {
		const e = 1e-3;
		const want: Root[] = [
			...pair(Math.cos(e) - 1, Math.sin(e)),
			...pair(0.999 * Math.cos(2 * e) - 1, 0.999 * Math.sin(2 * e)),
			[-2, 0],
			...pair(-Math.cos(3 * e) - 1, Math.sin(3 * e))
		];
		const r = polyRoots(polyOf(want));
		expectRoots(r.re, r.im, want, 1e-9);
	});

	it('a double root is refused or certified only as a tight pair; polyRoots has it either way', () => {
		const want: Root[] = [[-2, 0], [-2, 0], [1, 0], ...pair(-1, 1)];
		const { p, ok, re, im } = fast(want);
		if (ok) expectRoots(re, im, want, 1e-6);
		const r = polyRoots(p);
		expectRoots(r.re, r.im, want, 1e-6);
		for (let k = 0; k < r.re.length; k++) expect(residual(p, r.re[k], r.im[k])).toBeLessThan(1e-13);
	});

	it('a triple root is not certified (QR takes over) and polyRoots still returns the cluster', () => {
		const want: Root[] = [
			[-1, 0],
			[-1, 0],
			[-1, 0],
			[-2, 0],
			[3, 0]
		];
		const { p, ok } = fast(want);
		expect(ok).toBe(false);
		const r = polyRoots(p);
		expectRoots(r.re, r.im, want, 1e-4);
	});

	it('clustered distinct roots 1, 1.001, 1.002, 1.003: found to the accuracy their conditioning allows', () => {
		const want: Root[] = [
			[1, 0],
			[1.001, 0],
			[1.002, 0],
			[1.003, 0],
			[-5, 0]
		];
		const { p, ok, re, im } = fast(want);
		// a relative change of 1e-16 in the coefficients moves these roots by ~1e-7
		if (ok) expectRoots(re, im, want, 1e-6);
		const r = polyRoots(p);
		expectRoots(r.re, r.im, want, 1e-6);
	});

	it('polyRoots keeps two close real roots real, never merged into a conjugate pair', () => {
		// a nearly tangent crossing: roots 1 ± 1e-7 of a real polynomial
		const want: Root[] = [[1 - 1e-7, 0], [1 + 1e-7, 0], [-3, 0], ...pair(-1, 2)];
		const r = polyRoots(polyOf(want));
		const near = Array.from(r.re)
			.map((x, k) => [x, r.im[k]])
			.filter(([x]) => Math.abs(x - 1) < 1e-3);
		expect(near.length).toBe(2);
		// the two may come back as a pair x ± iy split by rounding, but then only within rounding
		for (const [x, y] of near) expect(Math.hypot(x - 1, y)).toBeLessThan(2e-7);
		for (let k = 0; k < r.im.length; k++)
			if (r.im[k] !== 0) expect(Array.from(r.im).includes(-r.im[k])).toBe(true);
	});

	it('odd degree: one root exactly real, the pairs exactly conjugate (polyRoots)', () => {
		const want: Root[] = [[0.3, 0], ...pair(-0.2, 0.9), ...pair(1.5, 0.01)];
		const r = polyRoots(polyOf(want));
		expect(Array.from(r.im).filter((y) => y === 0).length).toBe(1);
		for (let k = 0; k < r.im.length; k++)
			if (r.im[k] !== 0) {
				const j = Array.from(r.im).findIndex((y, i) => i !== k && y === -r.im[k]);
				expect(j).toBeGreaterThanOrEqual(0);
				expect(r.re[j]).toBe(r.re[k]);
			}
		expectRoots(r.re, r.im, want, 1e-12);
	});

	// a closed loop's poles: three close real ones among well separated roots
	const closeReal: Root[] = [
		[-26.2, 0],
		[-9.93, 0],
		[-2.01, 0],
		...pair(-0.594, 1.2),
		[-0.31, 0],
		[-0.27, 0],
		[-0.21, 0]
	];

	it('close real roots come back exactly real, not as stray pairs', () => {
		const want = closeReal;
		const r = polyRoots(polyOf(want));
		expect(Array.from(r.im).filter((y) => y === 0).length).toBe(6);
		expectRoots(r.re, r.im, want, 1e-12);
	});

	it('500 seeded root sets (degrees 3–20, five decades, real and paired): every root found', () => {
		let seed = 20261202;
		const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
		for (let t = 0; t < 500; t++) {
			const n = 3 + Math.floor(rnd() * 18);
			const want: Root[] = [];
			while (want.length < n) {
				const r = 10 ** (rnd() * 5 - 2.5) * (rnd() < 0.5 ? -1 : 1);
				if (want.length + 1 < n && rnd() < 0.5) want.push(...pair(r, Math.abs(r) * (0.05 + rnd())));
				else want.push([r, 0]);
			}
			const p = polyOf(want);
			const r = polyRoots(p);
			expect(r.re.length).toBe(n);
			for (let k = 0; k < n; k++) {
				expect(residual(p, r.re[k], r.im[k])).toBeLessThan(1e-12);
				// conjugate-closed exactly, as the engine's consumers assume
				if (r.im[k] !== 0)
					expect(
						Array.from(r.re).some((x, j) => j !== k && x === r.re[k] && r.im[j] === -r.im[k])
					).toBe(true);
			}
			// well separated sets (every gap above 5 % of the modulus) are found to 1e-8
			const gap = Math.min(
				...want.map(([a, b], i) =>
					Math.min(
						...want
							.filter((_, j) => j !== i)
							.map(([c, d]) => Math.hypot(a - c, b - d) / Math.hypot(a, b))
					)
				)
			);
			if (gap > 0.05) expectRoots(r.re, r.im, want, 1e-8);
		}
	});
});
