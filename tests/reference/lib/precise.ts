/**
 * A third computation, in 60-digit decimal arithmetic (decimal.js), for the places where the
 * engine and the double-precision reference disagree: it settles which one is right.
 *
 * - `preciseZoh`: the exact zero-order-hold discretisation of a generated continuous loop, by
 *   partial fractions of the step response (the textbook formula; see zoh.ts), evaluated on the
 *   unit circle with every term carried to 60 digits — so a response that is a 13-digit
 *   cancellation of its terms (a high-order loop deep in its roll-off) still comes out right.
 * - `preciseUnstableZ`: closed-loop roots with |z| ≥ 1 of den + k·num, the coefficients taken
 *   exactly as the doubles in the file, by the bilinear map and a Routh array in 60 digits.
 *   A polynomial file states a double integrator only to rounding: its "roots at z = 1" split by
 *   ~1e-7 and sit a hair outside the circle — an exact count sees that, a Nyquist count starting
 *   at a grid frequency cannot.
 */
import Decimal from 'decimal.js';
import type { Complex, GeneratedLoop } from '../../../scripts/lib/loop-generator';

const D = Decimal.clone({ precision: 60 });
type Dec = InstanceType<typeof D>;
type C = [Dec, Dec];

const ZERO = new D(0);
const ONE = new D(1);
/**
 * The exact value of a double: decimal.js reads a number through its shortest round-trip string,
 * which is off by up to half an ulp — and an integrator written out in coefficients lives in
 * exactly that half ulp. 100 significant digits hold any double of these loops exactly enough.
 */
const exact = (x: number | Dec): Dec =>
	typeof x === 'number' ? new D(x === 0 || !Number.isFinite(x) ? x : x.toPrecision(100)) : x;
const c = (re: number | Dec, im: number | Dec = 0): C => [exact(re), exact(im)];
const add = (a: C, b: C): C => [a[0].plus(b[0]), a[1].plus(b[1])];
const sub = (a: C, b: C): C => [a[0].minus(b[0]), a[1].minus(b[1])];
const mul = (a: C, b: C): C => [
	a[0].times(b[0]).minus(a[1].times(b[1])),
	a[0].times(b[1]).plus(a[1].times(b[0]))
];
function div(a: C, b: C): C {
	const d = b[0].times(b[0]).plus(b[1].times(b[1]));
	return [
		a[0].times(b[0]).plus(a[1].times(b[1])).div(d),
		a[1].times(b[0]).minus(a[0].times(b[1])).div(d)
	];
}
const toComplex = (a: C): Complex => [a[0].toNumber(), a[1].toNumber()];

/** Ascending real coefficients of lead·Π(s − r) (conjugates listed too), in 60 digits. */
function ascending(roots: Complex[], lead: number): Dec[] {
	let p: C[] = [c(lead)];
	for (const [re, im] of roots) {
		const out: C[] = new Array(p.length + 1).fill(null).map(() => c(0));
		p.forEach((x, i) => {
			out[i] = sub(out[i], mul(x, c(re, im)));
			out[i + 1] = add(out[i + 1], x);
		});
		p = out;
	}
	return p.map((x) => x[0]);
}

/** G_zoh(e^{jωT}) of a generated continuous loop (distinct poles, at most two integrators). */
export function preciseZoh(
	loop: GeneratedLoop,
	T = loop.sampleTimeSeconds!
): (w: number) => Complex {
	const all = loop.sections.flatMap((s) => s.poles);
	const k = all.filter(([a, b]) => a === 0 && b === 0).length;
	if (k > 2) throw new Error(`seed ${loop.seed}: more than two integrators`);
	const poles = all.filter(([a, b]) => a !== 0 || b !== 0).map(([a, b]) => c(a, b));
	const zeros = loop.sections.flatMap((s) => s.zeros).map(([a, b]) => c(a, b));
	const t = exact(T);
	// Taylor coefficients h₀…h_k of K·N(s)/D(s) at 0 (D without its integrators)
	const num = ascending(
		loop.sections.flatMap((s) => s.zeros),
		loop.gain
	);
	const den = ascending(
		all.filter(([a, b]) => a !== 0 || b !== 0),
		1
	);
	const h: Dec[] = [];
	for (let m = 0; m <= k; m++) {
		let acc = num[m] ?? ZERO;
		for (let j = 1; j <= m; j++) acc = acc.minus((den[j] ?? ZERO).times(h[m - j]));
		h.push(acc.div(den[0]));
	}
	// residue of G(s)/s at each non-zero pole, and e^{pT}
	const terms = poles.map((p, i) => {
		let v: C = c(loop.gain);
		for (const z of zeros) v = mul(v, sub(p, z));
		poles.forEach((q, j) => {
			if (j !== i) v = div(v, sub(p, q));
		});
		for (let m = 0; m <= k; m++) v = div(v, p);
		const m = p[0].times(t).exp();
		const e: C = [m.times(p[1].times(t).cos()), m.times(p[1].times(t).sin())];
		return { r: v, e };
	});
	return (w) => {
		const th = exact(w).times(t);
		const z: C = [th.cos(), th.sin()];
		const zm1 = sub(z, c(1));
		let acc: C = c(h[k]);
		if (k >= 1) acc = add(acc, div(c(h[k - 1].times(t)), zm1));
		if (k >= 2)
			acc = add(acc, div(mul(c(h[k - 2].times(t).times(t).div(2)), add(z, c(1))), mul(zm1, zm1)));
		for (const { r, e } of terms) acc = add(acc, div(mul(r, zm1), sub(z, e)));
		return toComplex(acc);
	};
}

/** L(e^{jθ}) of a z-domain polynomial file, exactly from its coefficients (descending). */
export function preciseZPoly(num: number[], den: number[], T: number): (w: number) => Complex {
	const n = num.map(exact);
	const d = den.map(exact);
	const t = exact(T);
	const horner = (p: Dec[], z: C) => p.reduce<C>((acc, x) => add(mul(acc, z), c(x)), c(0));
	return (w) => {
		const th = exact(w).times(t);
		const z: C = [th.cos(), th.sin()];
		return toComplex(div(horner(n, z), horner(d, z)));
	};
}

/**
 * Roots with Re ≥ 0 of a real polynomial (descending), from the first column of its Routh
 * array in 60 digits; null when a pivot vanishes (roots on or symmetric about the axis).
 */
function routh(p: Dec[]): number | null {
	while (p.length > 1 && p[0].isZero()) p = p.slice(1);
	const n = p.length - 1;
	if (n === 0) return 0;
	const scale = p.reduce((m, x) => Decimal.max(m, x.abs()), ZERO);
	let r0 = p.filter((_, i) => i % 2 === 0);
	let r1 = p.filter((_, i) => i % 2 === 1);
	const column = [r0[0]];
	for (let j = 0; j < n; j++) {
		// a pivot at 1e-45 of the coefficients is a zero the rounding of 60 digits did not show
		if (!r1[0] || r1[0].abs().lte(scale.times('1e-45'))) return null;
		column.push(r1[0]);
		const next: Dec[] = [];
		for (let i = 0; i < r0.length - 1; i++)
			next.push(r0[i + 1].minus(r0[0].div(r1[0]).times(r1[i + 1] ?? ZERO)));
		[r0, r1] = [r1, next];
	}
	let changes = 0;
	for (let i = 1; i < column.length; i++)
		if (column[i].isNegative() !== column[i - 1].isNegative()) changes++;
	return changes;
}

/** Roots of den + k·num (descending, z) with |z| ≥ 1, exactly from the given doubles. */
export function preciseUnstableZ(num: number[], den: number[], k: number): number | null {
	const off = den.length - num.length;
	const chr = den.map((x, i) => {
		const v = exact(x);
		return i >= off ? v.plus(exact(num[i - off]).times(exact(k))) : v;
	});
	// z = (1 + w)/(1 − w): |z| < 1 ⇔ Re w < 0; Σ aᵢ z^(n−i) ↦ Σ aᵢ (1 + w)^(n−i) (1 − w)^i
	const n = chr.length - 1;
	let q: Dec[] = new Array(n + 1).fill(ZERO);
	for (let i = 0; i <= n; i++) {
		let term: Dec[] = [chr[i]];
		const times = (f: [Dec, Dec]) => {
			const out: Dec[] = new Array(term.length + 1).fill(ZERO);
			term.forEach((x, j) => {
				out[j] = out[j].plus(x.times(f[0]));
				out[j + 1] = out[j + 1].plus(x.times(f[1]));
			});
			term = out;
		};
		for (let j = 0; j < n - i; j++) times([ONE, ONE]);
		for (let j = 0; j < i; j++) times([ONE.neg(), ONE]);
		q = q.map((x, j) => x.plus(term[j]));
	}
	// a root at z = −1 maps to w = ∞: the leading coefficient vanishes
	if (q[0].abs().lte(q.reduce((m, x) => Decimal.max(m, x.abs()), ZERO).times('1e-45'))) return null;
	return routh(q);
}
