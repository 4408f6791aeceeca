/**
 * Zero-order-hold discretisation computed here, independently of the engine, so that the
 * properties test can evaluate a discretised loop's L(e^{jωT}) directly.
 *
 * Route: cascade state space → exp([[A, B], [0, 0]]·T) (Taylor with scaling and squaring; the
 * cascade keeps the matrix well scaled) → transfer numerator by sampling C(zI − Ad)⁻¹Bd + D on a
 * rotated unit circle and inverting the DFT (a unitary, hence well-conditioned, step). The
 * denominator is exact: poles map to e^{pT}.
 */
import {
	cascadeStateSpace,
	polyFromRoots,
	polyval,
	type Complex,
	type GeneratedLoop
} from '../../../scripts/lib/loop-generator';

function matmul(a: number[][], b: number[][]): number[][] {
	return a.map((row) => b[0].map((_, j) => row.reduce((s, x, k) => s + x * b[k][j], 0)));
}

export function expm(m: number[][]): number[][] {
	const n = m.length;
	const norm = Math.max(...m.map((row) => row.reduce((s, x) => s + Math.abs(x), 0)), 0);
	const squarings = Math.max(0, Math.ceil(Math.log2(norm || 1)) + 1);
	const scaled = m.map((row) => row.map((x) => x / 2 ** squarings));
	let result = scaled.map((row, i) => row.map((_, j) => (i === j ? 1 : 0)));
	let term = result;
	for (let k = 1; k <= 24; k++) {
		term = matmul(term, scaled).map((row) => row.map((x) => x / k));
		result = result.map((row, i) => row.map((x, j) => x + term[i][j]));
	}
	for (let s = 0; s < squarings; s++) result = matmul(result, result);
	return result.slice(0, n);
}

/** C(xI − A)⁻¹B + D by complex Gaussian elimination with partial pivoting. */
export function stateSpaceResponse(a: number[][], b: number[], c: number[], d: number, x: Complex): Complex {
	const n = a.length;
	const re = a.map((row, i) => [...row.map((v, j) => (i === j ? x[0] : 0) - v), b[i]]);
	const im = a.map((row, i) => [...row.map((_, j) => (i === j ? x[1] : 0)), 0]);
	for (let col = 0; col < n; col++) {
		let piv = col;
		for (let r = col + 1; r < n; r++)
			if (Math.hypot(re[r][col], im[r][col]) > Math.hypot(re[piv][col], im[piv][col])) piv = r;
		[re[col], re[piv]] = [re[piv], re[col]];
		[im[col], im[piv]] = [im[piv], im[col]];
		const pr = re[col][col];
		const pi = im[col][col];
		const pd = pr * pr + pi * pi;
		for (let r = col + 1; r < n; r++) {
			// factor = row[r][col] / pivot
			const fr = (re[r][col] * pr + im[r][col] * pi) / pd;
			const fi = (im[r][col] * pr - re[r][col] * pi) / pd;
			for (let j = col; j <= n; j++) {
				re[r][j] -= fr * re[col][j] - fi * im[col][j];
				im[r][j] -= fr * im[col][j] + fi * re[col][j];
			}
		}
	}
	const vr = new Array(n).fill(0);
	const vi = new Array(n).fill(0);
	for (let r = n - 1; r >= 0; r--) {
		let sr = re[r][n];
		let si = im[r][n];
		for (let j = r + 1; j < n; j++) {
			sr -= re[r][j] * vr[j] - im[r][j] * vi[j];
			si -= re[r][j] * vi[j] + im[r][j] * vr[j];
		}
		const pd = re[r][r] ** 2 + im[r][r] ** 2;
		vr[r] = (sr * re[r][r] + si * im[r][r]) / pd;
		vi[r] = (si * re[r][r] - sr * im[r][r]) / pd;
	}
	return [d + c.reduce((s, ci, i) => s + ci * vr[i], 0), c.reduce((s, ci, i) => s + ci * vi[i], 0)];
}

export interface ZTransfer {
	num: number[];
	den: number[];
}

/** ZOH equivalent of a continuous generated loop, as z-domain polynomials (descending). */
export function zohTransfer(loop: GeneratedLoop, T = loop.sampleTimeSeconds!): ZTransfer {
	const ss = cascadeStateSpace(loop);
	const n = ss.a.length;
	const aug = Array.from({ length: n + 1 }, (_, i) =>
		Array.from({ length: n + 1 }, (_, j) => (i === n ? 0 : j === n ? ss.b[i] * T : ss.a[i][j] * T))
	);
	const e = expm(aug);
	const ad = e.map((row) => row.slice(0, n));
	const bd = e.map((row) => row[n]);
	const den = polyFromRoots(
		loop.sections.flatMap((s) => s.poles).map(([re, im]): Complex => {
			const m = Math.exp(re * T);
			return [m * Math.cos(im * T), m * Math.sin(im * T)];
		})
	);
	// N(z) = G(z)·D(z) sampled at n + 1 points of a rotated circle; the rotation keeps clear of z = 1
	const theta0 = 0.3141;
	const samples: Complex[] = [];
	for (let k = 0; k <= n; k++) {
		const t = theta0 + (2 * Math.PI * k) / (n + 1);
		const z: Complex = [Math.cos(t), Math.sin(t)];
		const g = stateSpaceResponse(ad, bd, ss.c, ss.d, z);
		const dz = polyval(den, z);
		samples.push([g[0] * dz[0] - g[1] * dz[1], g[0] * dz[1] + g[1] * dz[0]]);
	}
	const ascending: number[] = [];
	for (let j = 0; j <= n; j++) {
		let sr = 0;
		let si = 0;
		for (let k = 0; k <= n; k++) {
			const t = (-2 * Math.PI * j * k) / (n + 1);
			sr += samples[k][0] * Math.cos(t) - samples[k][1] * Math.sin(t);
			si += samples[k][0] * Math.sin(t) + samples[k][1] * Math.cos(t);
		}
		// undo the rotation: the sum gives c_j·e^{ijθ0}·(n + 1)
		const t = -j * theta0;
		ascending.push((sr * Math.cos(t) - si * Math.sin(t)) / (n + 1));
	}
	return { num: ascending.reverse(), den };
}
