/**
 * Continuous blocks carried into a sampled loop: zero-order hold (exact for a piecewise-constant
 * input) and Tustin's bilinear substitution s = (2/T)(z−1)/(z+1).
 */
import type { Factor } from './blocks';
import { ModelError, type PathSegment } from './issues';
import { expm, type Matrix } from './linalg';
import { add, fromRoots, mul, powerOfTwo, scale, trim, type Poly } from './polynomial';
import { cascade } from './cascade';
import { fromOffsets } from './circle-fit';
import { sampledNumerator } from './zeros';
import { polyRoots, type Roots } from './roots';

export function tustin(f: Factor, T: number): Factor {
	const n = f.den.length - 1;
	const m = f.num.length - 1;
	const order = Math.max(n, m);
	const k = 2 / T;
	// (z−1)^i (z+1)^(order−i), built once for every i
	const minus: Poly[] = [[1]];
	const plus: Poly[] = [[1]];
	for (let i = 1; i <= order; i++) {
		minus.push(mul(minus[i - 1], [-1, 1]));
		plus.push(mul(plus[i - 1], [1, 1]));
	}
	const map = (p: Poly): Poly => {
		let out: Poly = [];
		let ki = 1;
		for (let i = 0; i < p.length; i++) {
			if (p[i] !== 0) out = add(out, scale(mul(minus[i], plus[order - i]), p[i] * ki));
			ki *= k;
		}
		return trim(out);
	};
	// roots found in s keep exact integrators (z = 1 exactly), which roots found in z would not
	const mapRoots = (r: Roots, extra: number): Roots => {
		const re: number[] = [];
		const im: number[] = [];
		const off: number[] = [];
		for (let i = 0; i < r.re.length; i++) {
			// z = (1 + sT/2)/(1 − sT/2); a root at s = 2/T goes to infinity and leaves the list
			const ar = 1 + (r.re[i] * T) / 2;
			const ai = (r.im[i] * T) / 2;
			const br = 1 - (r.re[i] * T) / 2;
			const bi = -ai;
			const d = br * br + bi * bi;
			if (d === 0) continue;
			re.push((ar * br + ai * bi) / d);
			im.push((ai * br - ar * bi) / d);
			// 1 − z = −sT/(1 − sT/2), free of cancellation near z = 1
			const sr = -r.re[i] * T;
			const si = -r.im[i] * T;
			off.push((sr * br + si * bi) / d);
		}
		for (let i = 0; i < extra; i++) {
			re.push(-1);
			im.push(0);
			off.push(2);
		}
		return { re: Float64Array.from(re), im: Float64Array.from(im), offRe: Float64Array.from(off) };
	};
	return {
		num: map(f.num),
		den: map(f.den),
		zeros: mapRoots(f.zeros ?? polyRoots(f.num), order - m),
		poles: mapRoots(f.poles ?? polyRoots(f.den), order - n)
	};
}

/**
 * Zero-order hold: e^{[[A, b], [0, 0]]·T} of a well-scaled realisation (the block's own, or a
 * cascade of sections built from its roots) gives Φ and Γ. The denominator is exact (poles map to
 * e^{pT}); the numerator N(z) = D(z)·(c(zI − Φ)⁻¹Γ + d) comes from its zeros, found and
 * polished on N itself (zeros.ts).
 */
export function zeroOrderHold(f: Factor, T: number, path: PathSegment[]): Factor {
	const n = f.den.length - 1;
	if (f.num.length - 1 > n)
		throw new ModelError(
			path,
			'zero-order hold needs a proper block (numerator degree ≤ denominator degree)'
		);
	if (n === 0)
		return {
			num: f.num,
			den: f.den,
			zeros: { re: new Float64Array(0), im: new Float64Array(0) },
			poles: f.poles
		};
	const sPoles = f.poles ?? polyRoots(f.den);
	const real =
		f.realisation ??
		cascade(f.zeros ?? polyRoots(f.num), sPoles, f.num[f.num.length - 1] / f.den[n]);
	const size = n + 1;
	// Γ is linear in b: a unit-sized b keeps the augmented matrix's norm (and so the number of
	// squarings, each costing accuracy) set by the dynamics, not by the block's gain
	const bScale = powerOfTwo(Math.max(...real.b.map(Math.abs))) || 1;
	const m: Matrix = Array.from({ length: size }, () => new Array<number>(size).fill(0));
	for (let i = 0; i < n; i++) {
		for (let j = 0; j < n; j++) m[i][j] = real.a[i][j] * T;
		m[i][n] = (real.b[i] / bScale) * T;
	}
	const e = expm(m);
	if (!e.every((row) => row.every(Number.isFinite)))
		throw new ModelError(
			path,
			`zero-order hold overflows at T = ${T} s (a pole too fast or too unstable for this sample time)`
		);
	const phi = e.slice(0, n).map((row) => row.slice(0, n));
	const gamma = e.slice(0, n).map((row) => row[n] * bScale);

	const zre = new Float64Array(n);
	const zim = new Float64Array(n);
	const off = new Float64Array(n);
	for (let i = 0; i < n; i++) {
		const mag = Math.exp(sPoles.re[i] * T);
		if (!Number.isFinite(mag))
			throw new ModelError(
				path,
				`zero-order hold overflows: pole ${sPoles.re[i]} with T = ${T} s gives e^(pT) = ∞`
			);
		const b = sPoles.im[i] * T;
		zre[i] = mag * Math.cos(b);
		zim[i] = sPoles.im[i] === 0 ? 0 : mag * Math.sin(b);
		// 1 − e^{aT}cos(bT) without cancellation, for poles sampled far faster than they move
		const s = Math.sin(0.5 * b);
		off[i] = -Math.expm1(sPoles.re[i] * T) * Math.cos(b) + 2 * s * s;
	}
	const poles: Roots = { re: zre, im: zim, offRe: off };
	const phiMinusI = phi.map((row, i) => row.map((x, j) => x - (i === j ? 1 : 0)));
	const { numW, zeros } = sampledNumerator({ m: phiMinusI, g: gamma, c: real.c, d: real.d, poles });
	return {
		num: fromRoots(zeros.re, zeros.im, numW[numW.length - 1]),
		den: fromRoots(zre, zim),
		zeros,
		poles,
		numW,
		denW: fromOffsets(poles)
	};
}

export function discretise(
	f: Factor,
	method: 'zoh' | 'tustin',
	T: number,
	path: PathSegment[]
): Factor {
	return method === 'zoh' ? zeroOrderHold(f, T, path) : tustin(f, T);
}
