/**
 * A single-input single-output state-space block (A, b, c, d) as N/D:
 *   D = poly(eig A), N = d·D + N_sp with N_sp(s) = D(s)·c(sI − A)⁻¹b.
 * N_sp is recovered from its values on a circle through the eigenvalues' magnitude (n samples of
 * a degree < n polynomial, inverted exactly by a DFT, a unitary step): this avoids subtracting
 * poly(eig(A − bc)) from poly(eig A), whose cancellation costs many digits on stiff realisations.
 */
import type { Factor } from './blocks';
import { eigenvalues, type Matrix } from './linalg';
import { fitOnCircle, fromOffsets } from './circle-fit';
import { add, fromRoots, powerOfTwo, scale, trim } from './polynomial';
import { sampledNumerator } from './zeros';
import type { Roots } from './roots';
import type { StateSpaceBlock } from './schema';

/**
 * `sampled`: a z-domain block, whose zeros are then polished on N itself near z = 1 (zeros.ts)
 * and which is also returned in powers of w = z − 1.
 */
export function stateSpaceFactor(block: StateSpaceBlock, sampled = false): Factor {
	const a = block.a;
	const b = block.b.map((row) => row[0]);
	const c = block.c[0];
	const d = block.d ? block.d[0][0] : 0;
	const n = a.length;
	const rho = Math.max(
		...a.map((row) => row.reduce((s, x) => s + Math.abs(x), 0)),
		Number.MIN_VALUE
	);
	const poles = snapIntegrators(pairUp(eigenvalues(a)), rho);
	const den = fromRoots(poles.re, poles.im);
	const h = (xr: number, xi: number) => transfer(a, b, c, xr, xi);
	const realisation = { a, b, c, d };
	if (!sampled) {
		const strict = fitOnCircle(n, 0, radiusOf(poles, 0), poles, h);
		return { num: trim(add(scale(den, d), strict)), den, poles, realisation };
	}
	const offsets: Roots = { ...poles, offRe: Float64Array.from(poles.re, (x) => 1 - x) };
	const m = a.map((row, i) => row.map((x, j) => x - (i === j ? 1 : 0)));
	const { numW, zeros } = sampledNumerator({ m, g: b, c, d, poles: offsets });
	return {
		num: fromRoots(zeros.re, zeros.im, numW[numW.length - 1]),
		den,
		zeros,
		poles: offsets,
		numW,
		denW: fromOffsets(offsets),
		realisation
	};
}

/** Geometric mean of the poles' distances from the centre (a power of two; 1 when all sit on it). */
export function radiusOf(poles: Roots, centre: number): number {
	let logSum = 0;
	let count = 0;
	for (let i = 0; i < poles.re.length; i++) {
		const m = Math.hypot(poles.re[i] - centre, poles.im[i]);
		if (m > 0) {
			logSum += Math.log(m);
			count++;
		}
	}
	return count ? powerOfTwo(Math.exp(logSum / count)) : 1;
}

/** numeric.eig returns conjugate pairs whose parts may differ in the last bit: make them exact. */
function pairUp(r: Roots): Roots {
	const re = r.re.slice();
	const im = r.im.slice();
	const used = new Uint8Array(re.length);
	for (let i = 0; i < re.length; i++) {
		if (used[i] || im[i] === 0) continue;
		if (Math.abs(im[i]) <= 1e-14 * Math.hypot(re[i], im[i])) {
			im[i] = 0;
			continue;
		}
		let best = -1;
		for (let j = i + 1; j < re.length; j++)
			if (
				!used[j] &&
				Math.sign(im[j]) === -Math.sign(im[i]) &&
				(best < 0 ||
					Math.hypot(re[j] - re[i], im[j] + im[i]) < Math.hypot(re[best] - re[i], im[best] + im[i]))
			)
				best = j;
		if (best < 0) {
			im[i] = 0; // no partner: a real root whose rounding came out complex
			continue;
		}
		used[i] = used[best] = 1;
		const mid = 0.5 * (re[i] + re[best]);
		const half = 0.5 * (Math.abs(im[i]) + Math.abs(im[best]));
		re[i] = re[best] = mid;
		im[i] = Math.sign(im[i]) * half;
		im[best] = -im[i];
	}
	return { re, im };
}

/**
 * Integrators come out of the eigenvalue routine as rounding-sized numbers, and a Jordan chain of
 * m integrators as a cluster of size (eps·ρ^m)^(1/m): both are set to exactly zero, judged by the
 * cluster's sum and product (which rounding leaves near zero; genuine slow poles do not).
 */
function snapIntegrators(r: Roots, rho: number): Roots {
	const re = r.re.slice();
	const im = r.im.slice();
	const small: number[] = [];
	for (let i = 0; i < re.length; i++) {
		const m = Math.hypot(re[i], im[i]);
		if (m <= 1e-11 * rho) re[i] = im[i] = 0;
		else if (m <= 1e-6 * rho) small.push(i);
	}
	if (small.length > 0) {
		let sr = 0;
		let si = 0;
		let pr = 1;
		let pi = 0;
		for (const i of small) {
			sr += re[i];
			si += im[i];
			[pr, pi] = [pr * re[i] - pi * im[i], pr * im[i] + pi * re[i]];
		}
		if (Math.hypot(sr, si) <= 1e-10 * rho && Math.hypot(pr, pi) <= 1e-12 * rho ** small.length)
			for (const i of small) re[i] = im[i] = 0;
	}
	return { re, im };
}

/** c·(sI − A)⁻¹·b by complex Gaussian elimination with partial pivoting. */
export function transfer(
	a: Matrix,
	b: number[],
	c: number[],
	s: number,
	t: number
): [number, number] {
	const n = a.length;
	const mr = a.map((row, i) => [...row.map((x, j) => (i === j ? s : 0) - x), b[i]]);
	const mi = a.map((row, i) => [...row.map((_, j) => (i === j ? t : 0)), 0]);
	for (let col = 0; col < n; col++) {
		let piv = col;
		for (let r = col + 1; r < n; r++)
			if (Math.hypot(mr[r][col], mi[r][col]) > Math.hypot(mr[piv][col], mi[piv][col])) piv = r;
		[mr[col], mr[piv]] = [mr[piv], mr[col]];
		[mi[col], mi[piv]] = [mi[piv], mi[col]];
		const [pr, pi] = [mr[col][col], mi[col][col]];
		const pd = pr * pr + pi * pi;
		if (pd === 0) continue;
		for (let r = col + 1; r < n; r++) {
			const fr = (mr[r][col] * pr + mi[r][col] * pi) / pd;
			const fi = (mi[r][col] * pr - mr[r][col] * pi) / pd;
			if (fr === 0 && fi === 0) continue;
			for (let j = col; j <= n; j++) {
				mr[r][j] -= fr * mr[col][j] - fi * mi[col][j];
				mi[r][j] -= fr * mi[col][j] + fi * mr[col][j];
			}
		}
	}
	const xr = new Array<number>(n).fill(0);
	const xi = new Array<number>(n).fill(0);
	for (let r = n - 1; r >= 0; r--) {
		let ar = mr[r][n];
		let ai = mi[r][n];
		for (let j = r + 1; j < n; j++) {
			ar -= mr[r][j] * xr[j] - mi[r][j] * xi[j];
			ai -= mr[r][j] * xi[j] + mi[r][j] * xr[j];
		}
		const pd = mr[r][r] ** 2 + mi[r][r] ** 2;
		xr[r] = (ar * mr[r][r] + ai * mi[r][r]) / pd;
		xi[r] = (ai * mr[r][r] - ar * mi[r][r]) / pd;
	}
	let gr = 0;
	let gi = 0;
	for (let i = 0; i < n; i++) {
		gr += c[i] * xr[i];
		gi += c[i] * xi[i];
	}
	return [gr, gi];
}
