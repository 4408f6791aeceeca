import { describe, expect, it } from 'vitest';
import { loneRoot, noPositiveRoots, noRootsOnSegment } from '../../../src/lib/margins/descartes';
import { fromRoots } from '../../../src/lib/margins/polynomial';

describe('Descartes–Obreshkoff certificates (descartes.ts)', () => {
	it('no root near the positive axis / the segment: one sign throughout', () => {
		expect(noPositiveRoots(fromRoots([-1, -2, -3], [0, 0, 0]))).toBe(true);
		expect(noPositiveRoots(fromRoots([-1, 2], [0, 0]))).toBe(false);
		// roots 3 and −1: none in the lens over [0, 2.5]
		expect(noRootsOnSegment(fromRoots([3, -1], [0, 0]), 2.5)).toBe(true);
		expect(noRootsOnSegment(fromRoots([2, -1], [0, 0]), 2.5)).toBe(false);
	});

	it('the lone positive root of (x − 2)(x² + x + 1) = x³ − x² − x − 2, to a few ulps', () => {
		const x = loneRoot([-2, -1, -1, 1], Infinity);
		expect(x).not.toBeNull();
		expect(Math.abs(x! - 2)).toBeLessThan(2e-15);
	});

	it('the lone root in the lens over [0, 2.5] of (u − 0.5)(u − 4)(u + 1)', () => {
		const x = loneRoot(fromRoots([0.5, 4, -1], [0, 0, 0]), 2.5);
		expect(x).not.toBeNull();
		expect(Math.abs(x! - 0.5)).toBeLessThan(1e-15);
	});

	it('no lone root when the signs allow more: two real roots, a near-real pair, a root at 0', () => {
		expect(loneRoot(fromRoots([1, 3], [0, 0]), Infinity)).toBeNull();
		// 1 and 2 ± 1e-3j (a nearly tangent crossing): three sign changes, left to the eigenvalues
		expect(loneRoot(fromRoots([1, 2, 2], [0, 1e-3, -1e-3]), Infinity)).toBeNull();
		expect(loneRoot(fromRoots([0, 2], [0, 0]), Infinity)).toBeNull();
		// the one positive root 4 lies beyond the segment [0, 2.5]
		expect(loneRoot(fromRoots([4, -1], [0, 0]), 2.5)).toBeNull();
	});
});
