/**
 * Dense linear algebra on top of `numeric`: eigenvalues of a general real matrix (state-space
 * blocks) and the matrix exponential (zero-order hold).
 */
import numeric from 'numeric';
import { balance, hqr } from './hqr';

// numeric's generated code looks the library up as a global in the browser bundle
(globalThis as { numeric?: unknown }).numeric ??= numeric;

export type Matrix = number[][];

/**
 * Eigenvalues of a real square matrix. Rows and columns are first permuted to block-triangular
 * form (strongly connected components of the sparsity pattern, as LAPACK's balancing does), so a
 * cascade realisation yields each section's eigenvalues exactly from its own 1×1 or 2×2 block;
 * only blocks that remain coupled go to numeric.eig (our own QR when it throws).
 */
export function eigenvalues(m: Matrix): { re: Float64Array; im: Float64Array } {
	const n = m.length;
	const re = new Float64Array(n);
	const im = new Float64Array(n);
	let k = 0;
	for (const block of components(m)) {
		const sub = block.map((i) => block.map((j) => m[i][j]));
		const r = blockEigenvalues(sub);
		re.set(r.re, k);
		im.set(r.im, k);
		k += block.length;
	}
	return { re, im };
}

/** Tarjan's strongly connected components of the graph i → j for m[i][j] ≠ 0 (iterative). */
function components(m: Matrix): number[][] {
	const n = m.length;
	const index = new Int32Array(n).fill(-1);
	const low = new Int32Array(n);
	const onStack = new Uint8Array(n);
	const stack: number[] = [];
	const out: number[][] = [];
	let counter = 0;
	for (let root = 0; root < n; root++) {
		if (index[root] >= 0) continue;
		const work: [number, number][] = [[root, 0]];
		index[root] = low[root] = counter++;
		stack.push(root);
		onStack[root] = 1;
		while (work.length) {
			const top = work[work.length - 1];
			const [v, next] = top;
			let j = next;
			while (j < n && (j === v || m[v][j] === 0)) j++;
			if (j < n) {
				top[1] = j + 1;
				if (index[j] < 0) {
					index[j] = low[j] = counter++;
					stack.push(j);
					onStack[j] = 1;
					work.push([j, 0]);
				} else if (onStack[j]) low[v] = Math.min(low[v], index[j]);
				continue;
			}
			work.pop();
			if (work.length)
				low[work[work.length - 1][0]] = Math.min(low[work[work.length - 1][0]], low[v]);
			if (low[v] === index[v]) {
				const comp: number[] = [];
				let w: number;
				do {
					w = stack.pop() as number;
					onStack[w] = 0;
					comp.push(w);
				} while (w !== v);
				out.push(comp.sort((a, b) => a - b));
			}
		}
	}
	return out;
}

function blockEigenvalues(m: Matrix): { re: Float64Array; im: Float64Array } {
	const n = m.length;
	const re = new Float64Array(n);
	const im = new Float64Array(n);
	if (n === 1) {
		re[0] = m[0][0];
		return { re, im };
	}
	if (n === 2) {
		// λ² − tλ + d = 0 with the stable form of the quadratic formula
		const t = m[0][0] + m[1][1];
		const half = 0.5 * (m[0][0] - m[1][1]);
		const disc = half * half + m[0][1] * m[1][0];
		if (disc >= 0) {
			const q = 0.5 * t + (t >= 0 ? Math.sqrt(disc) : -Math.sqrt(disc));
			const det = m[0][0] * m[1][1] - m[0][1] * m[1][0];
			re[0] = q;
			re[1] = q !== 0 ? det / q : 0.5 * t - Math.sqrt(disc);
		} else {
			re[0] = re[1] = 0.5 * t;
			im[0] = Math.sqrt(-disc);
			im[1] = -im[0];
		}
		return { re, im };
	}
	try {
		const { lambda } = numeric.eig(m);
		const x = lambda.x as number[];
		const y = (lambda.y as number[] | undefined) ?? [];
		for (let i = 0; i < n; i++) {
			re[i] = x[i];
			im[i] = y[i] ?? 0;
		}
		if (re.every(Number.isFinite) && im.every(Number.isFinite)) return { re, im };
	} catch {
		// fall through to the Hessenberg QR below
	}
	const h = numeric.toUpperHessenberg(m).H as Matrix;
	const w = n + 1;
	const a = new Float64Array(w * w);
	for (let i = 0; i < n; i++)
		for (let j = 0; j < n; j++) a[(i + 1) * w + j + 1] = i > j + 1 ? 0 : h[i][j];
	balance(a, n);
	if (!hqr(a, n, re, im)) throw new Error('eigenvalues did not converge');
	return { re, im };
}

function identity(n: number): Matrix {
	return numeric.identity(n) as Matrix;
}

function norm1(m: Matrix): number {
	let best = 0;
	for (let j = 0; j < m.length; j++) {
		let s = 0;
		for (let i = 0; i < m.length; i++) s += Math.abs(m[i][j]);
		best = Math.max(best, s);
	}
	return best;
}

// [6/6] Padé coefficients of e^x
const PADE = [1, 1 / 2, 5 / 44, 1 / 66, 1 / 792, 1 / 15840, 1 / 665280];

/** e^M by scaling and squaring with a diagonal [6/6] Padé approximant (accurate to ~1e-16 once ‖M/2^s‖ ≤ 1/2). */
export function expm(m: Matrix): Matrix {
	const n = m.length;
	const nrm = norm1(m);
	const s = nrm > 0.5 ? Math.ceil(Math.log2(nrm / 0.5)) : 0;
	const a = numeric.mul(m, 2 ** -s) as Matrix;
	let power = identity(n);
	let num = identity(n);
	let den = identity(n);
	for (let k = 1; k < PADE.length; k++) {
		power = numeric.dot(power, a) as Matrix;
		const term = numeric.mul(power, PADE[k]) as Matrix;
		num = numeric.add(num, term) as Matrix;
		den = k % 2 === 0 ? (numeric.add(den, term) as Matrix) : (numeric.sub(den, term) as Matrix);
	}
	let e = solveColumns(den, num);
	for (let i = 0; i < s; i++) e = numeric.dot(e, e) as Matrix;
	return e;
}

function solveColumns(a: Matrix, b: Matrix): Matrix {
	const n = a.length;
	const lu = numeric.LU(a);
	const out: Matrix = Array.from({ length: n }, () => new Array<number>(n).fill(0));
	for (let j = 0; j < n; j++) {
		const col = numeric.LUsolve(
			lu,
			b.map((row) => row[j])
		) as number[];
		for (let i = 0; i < n; i++) out[i][j] = col[i];
	}
	return out;
}
