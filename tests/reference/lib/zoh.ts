/**
 * Zero-order-hold discretisation computed here, independently of the engine (and of Octave's
 * c2d), so the tests can evaluate a discretised loop's L(e^{jωT}) directly.
 *
 * Exact partial fractions of the sampled step response: with G(s)/s = Σ hₘ/s^(m+1) (the k
 * integrators and the hold's own 1/s) + Σ rᵢ/(s − pᵢ),
 *   G_zoh(z) = h_k + h_{k−1}·T/(z − 1) + h_{k−2}·T²(z + 1)/(2(z − 1)²) + Σ rᵢ(z − 1)/(z − e^{pᵢT}).
 * Everything is formed from z − 1 = −2sin²(θ/2) + j·sin θ and e^{pT} − 1 (expm1), so it keeps its
 * digits where ωT ≪ 1 — exactly where expanded z-polynomials (and a state-space solve, when the
 * realisation is far from normal) lose them. Generated poles are distinct, integrators at most two.
 */
import { polyval, type Complex, type GeneratedLoop } from '../../../scripts/lib/loop-generator';

const mul = (a: Complex, b: Complex): Complex => [
	a[0] * b[0] - a[1] * b[1],
	a[0] * b[1] + a[1] * b[0]
];
const div = (a: Complex, b: Complex): Complex => {
	const d = b[0] * b[0] + b[1] * b[1];
	return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const add = (a: Complex, b: Complex): Complex => [a[0] + b[0], a[1] + b[1]];

/** Ascending real polynomial from roots (conjugate pairs as quadratics). */
function ascending(roots: Complex[], lead = 1): number[] {
	let p = [lead];
	for (const [a, b] of roots) {
		if (b < 0) continue;
		const f = b === 0 ? [-a, 1] : [a * a + b * b, -2 * a, 1];
		const out = new Array(p.length + f.length - 1).fill(0);
		p.forEach((x, i) => f.forEach((y, j) => (out[i + j] += x * y)));
		p = out;
	}
	return p;
}

export function zohResponse(
	loop: GeneratedLoop,
	T = loop.sampleTimeSeconds!
): (w: number) => Complex {
	const evaluate = zohEvaluator(loop, T);
	return (w) => evaluate(w)[0];
}

/**
 * The ZOH response and a bound on its relative rounding error: the terms of the sum cancel deep in
 * the roll-off (|L| ≪ the terms), and there no evaluation from these numbers can be trusted.
 */
export function zohEvaluator(
	loop: GeneratedLoop,
	T = loop.sampleTimeSeconds!
): (w: number) => [Complex, number] {
	const all = loop.sections.flatMap((s) => s.poles);
	const k = all.filter(([a, b]) => a === 0 && b === 0).length;
	if (k > 2) throw new Error(`seed ${loop.seed}: more than two integrators`);
	const poles = all.filter(([a, b]) => a !== 0 || b !== 0);
	const zeros = loop.sections.flatMap((s) => s.zeros);
	// Taylor coefficients h₀…h_k of K·N(s)/D(s) at s = 0 (D without the integrators), by series division
	const num = ascending(zeros, loop.gain);
	const den = ascending(poles);
	const h: number[] = [];
	for (let m = 0; m <= k; m++) {
		let c = num[m] ?? 0;
		for (let j = 1; j <= m; j++) c -= (den[j] ?? 0) * h[m - j];
		h.push(c / den[0]);
	}
	// residue of G(s)/s at each non-zero pole
	const residues = poles.map((p, i) => {
		let v: Complex = [loop.gain, 0];
		for (const z of zeros) v = mul(v, [p[0] - z[0], p[1] - z[1]]);
		poles.forEach((q, j) => {
			if (j !== i) v = div(v, [p[0] - q[0], p[1] - q[1]]);
		});
		for (let m = 0; m <= k; m++) v = div(v, p);
		return v;
	});
	const eMinus1 = poles.map(([a, b]): Complex => [
		Math.expm1(a * T) * Math.cos(b * T) - 2 * Math.sin((b * T) / 2) ** 2,
		Math.exp(a * T) * Math.sin(b * T)
	]);
	const size = ([a, b]: Complex) => Math.hypot(a, b);
	return (w) => {
		const th = w * T;
		const zm1: Complex = [-2 * Math.sin(th / 2) ** 2, Math.sin(th)];
		const terms: Complex[] = [[h[k], 0]];
		if (k >= 1) terms.push(div([h[k - 1] * T, 0], zm1));
		if (k >= 2)
			terms.push(div([(h[k - 2] * T * T) / 2, 0], div(mul(zm1, zm1), [2 + zm1[0], zm1[1]])));
		residues.forEach((r, i) =>
			terms.push(mul(r, div(zm1, [zm1[0] - eMinus1[i][0], zm1[1] - eMinus1[i][1]])))
		);
		const sum = terms.reduce(add);
		// a few ulps per term, relative to what is left after the cancellation
		const bound =
			(8 * terms.length * Number.EPSILON * terms.reduce((s, t) => s + size(t), 0)) / size(sum);
		return [sum, bound];
	};
}

export interface ZTransfer {
	num: number[];
	den: number[];
}

/**
 * The same ZOH loop as z-domain polynomials (descending), for the Schur stability test. The
 * denominator is exact (poles map to e^{pT}); the numerator comes from sampling G·D on a rotated
 * unit circle and inverting the DFT — a unitary, hence well-conditioned, step.
 */
export function zohTransfer(loop: GeneratedLoop, T = loop.sampleTimeSeconds!): ZTransfer {
	const poles = loop.sections.flatMap((s) => s.poles);
	const n = poles.length;
	const den = ascending(
		poles.map(([re, im]): Complex => {
			const m = Math.exp(re * T);
			return [m * Math.cos(im * T), m * Math.sin(im * T)];
		})
	).reverse();
	const g = zohResponse(loop, T);
	// the rotation keeps the samples clear of z = 1, where integrators put their poles
	const theta0 = 0.3141;
	const samples: Complex[] = [];
	for (let j = 0; j <= n; j++) {
		const t = theta0 + (2 * Math.PI * j) / (n + 1);
		samples.push(mul(g(t / T), polyval(den, [Math.cos(t), Math.sin(t)])));
	}
	const coefficients: number[] = [];
	for (let j = 0; j <= n; j++) {
		let acc: Complex = [0, 0];
		samples.forEach((s, m) => {
			const t = (-2 * Math.PI * j * m) / (n + 1);
			acc = add(acc, mul(s, [Math.cos(t), Math.sin(t)]));
		});
		// undo the rotation: the sum is c_j·e^{ijθ0}·(n + 1)
		coefficients.push(mul(acc, [Math.cos(-j * theta0), Math.sin(-j * theta0)])[0] / (n + 1));
	}
	return { num: coefficients.reverse(), den };
}
