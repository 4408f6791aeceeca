/**
 * Continuous blocks carried into a sampled loop: zero-order hold (exact for a piecewise-constant
 * input) and Tustin's bilinear substitution s = (2/T)(z−1)/(z+1).
 */
import type { Factor } from './blocks';
import { ModelError, type PathSegment } from './issues';
import { expm, type Matrix } from './linalg';
import { add, fromRoots, mul, powerOfTwo, rootCentre, scale, scaleArgument, sub, trim, type Poly } from './polynomial';
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
 * Zero-order hold via e^{[[A, b], [0, 0]]·T} of the controllable canonical realisation, in a
 * frequency-scaled time unit so that stiff blocks keep a well-conditioned matrix. The
 * denominator is exact (poles map to e^{pT}); the numerator follows from the Markov parameters
 * c·Φ^j·Γ, which avoids subtracting two nearly equal characteristic polynomials.
 */
export function zeroOrderHold(f: Factor, T: number, path: PathSegment[]): Factor {
	const n = f.den.length - 1;
	if (f.num.length - 1 > n)
		throw new ModelError(path, 'zero-order hold needs a proper block (numerator degree ≤ denominator degree)');
	if (n === 0) return { num: f.num, den: f.den, zeros: { re: new Float64Array(0), im: new Float64Array(0) }, poles: f.poles };
	const w0 = powerOfTwo(rootCentre(f.den) ?? 1);
	const den = scaleArgument(f.den, w0);
	const num = scaleArgument(f.num, w0);
	const lead = den[n];
	const d = num.length - 1 === n ? num[n] / lead : 0;
	const strict = sub(num, scale(den, d));
	const t = w0 * T;
	const size = n + 1;
	const m: Matrix = Array.from({ length: size }, () => new Array<number>(size).fill(0));
	for (let i = 0; i < n - 1; i++) m[i][i + 1] = t;
	for (let j = 0; j < n; j++) m[n - 1][j] = (-den[j] / lead) * t;
	m[n - 1][n] = t;
	const e = expm(m);
	if (!e.every((row) => row.every(Number.isFinite)))
		throw new ModelError(path, `zero-order hold overflows at T = ${T} s (a pole too fast or too unstable for this sample time)`);
	const c = new Array<number>(n).fill(0);
	for (let j = 0; j < n; j++) c[j] = (strict[j] ?? 0) / lead;

	const sPoles = f.poles ?? polyRoots(f.den);
	const zre = new Float64Array(n);
	const zim = new Float64Array(n);
	const off = new Float64Array(n);
	for (let i = 0; i < n; i++) {
		const mag = Math.exp(sPoles.re[i] * T);
		if (!Number.isFinite(mag))
			throw new ModelError(path, `zero-order hold overflows: pole ${sPoles.re[i]} with T = ${T} s gives e^(pT) = ∞`);
		const b = sPoles.im[i] * T;
		zre[i] = mag * Math.cos(b);
		zim[i] = sPoles.im[i] === 0 ? 0 : mag * Math.sin(b);
		// 1 − e^{aT}cos(bT) without cancellation, for poles sampled far faster than they move
		const s = Math.sin(0.5 * b);
		off[i] = -Math.expm1(sPoles.re[i] * T) * Math.cos(b) + 2 * s * s;
	}
	const zDen = fromRoots(zre, zim);
	// Markov parameters h_j = c Φ^j Γ
	let v = e.slice(0, n).map((row) => row[n]);
	const h: number[] = [];
	for (let j = 0; j < n; j++) {
		h.push(v.reduce((s, x, i) => s + c[i] * x, 0));
		v = e.slice(0, n).map((row) => row.slice(0, n).reduce((s, x, i) => s + x * v[i], 0));
	}
	// N(z) = d·D(z) + Σ_i z^(n−i) Σ_{j<i} α_(i−1−j) h_j with α the descending coefficients of D
	const alpha = zDen.slice().reverse();
	const strictZ = new Array<number>(n + 1).fill(0);
	for (let i = 1; i <= n; i++) {
		let s = 0;
		for (let j = 0; j < i; j++) s += alpha[i - 1 - j] * h[j];
		strictZ[n - i] = s;
	}
	return { num: trim(add(scale(zDen, d), strictZ)), den: zDen, poles: { re: zre, im: zim, offRe: off } };
}

export function discretise(f: Factor, method: 'zoh' | 'tustin', T: number, path: PathSegment[]): Factor {
	return method === 'zoh' ? zeroOrderHold(f, T, path) : tustin(f, T);
}
