import { describe, expect, it } from 'vitest';
import { sortSmall } from '../../../src/lib/margins/small-sort';

describe('sortSmall', () => {
	it('orders as the native (stable) sort does, short lists and long ones', () => {
		let seed = 3;
		const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
		for (const n of [0, 1, 2, 7, 33, 64, 65, 200]) {
			// few distinct keys, so stability shows: each item remembers where it came from
			const items = Array.from({ length: n }, (_, i) => ({ k: Math.floor(rnd() * 5), i }));
			const order = (a: { k: number }, b: { k: number }) => a.k - b.k;
			expect(sortSmall(items.slice(), order)).toEqual(items.slice().sort(order));
		}
	});

	it('sorts in place and returns the same array', () => {
		const xs = [3, -1, 2.5, 0, -7];
		expect(sortSmall(xs, (a, b) => a - b)).toBe(xs);
		expect(xs).toEqual([-7, -1, 0, 2.5, 3]);
	});
});
