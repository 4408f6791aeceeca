/**
 * A well-scaled state-space realisation of a rational block from its roots: a series connection
 * of first- and second-order sections. Its matrix is block triangular with entries the size of
 * the poles, where a companion form's coefficients span the product of every pole magnitude
 * (ten poles from 1 to 700 rad/s: 27 decades), which wrecks the matrix exponential of the hold.
 */
import type { Matrix } from './linalg';
import type { Roots } from './roots';

export interface Realisation {
	a: Matrix;
	b: number[];
	c: number[];
	d: number;
}

interface Section {
	/** Monic denominator, ascending, degree 1 or 2. */
	den: number[];
	/** Monic numerator, ascending, degree ≤ den's. */
	num: number[];
}

type Root = [number, number];

const list = (r: Roots): Root[] =>
	Array.from(r.re, (x, i) => [x, r.im[i]] as Root).filter(([, y]) => y >= 0);
const quadratic = ([x, y]: Root): number[] => [x * x + y * y, -2 * x, 1];
const linear = ([x]: Root): number[] => [-x, 1];
const mul = (a: number[], b: number[]) => {
	const out = new Array<number>(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
	return out;
};

/** Sections for the given roots (complex ones listed once per pair here, im > 0). */
function sections(poles: Root[], zeros: Root[]): Section[] {
	const pairs = poles
		.filter(([, y]) => y > 0)
		.map((p) => ({ den: quadratic(p), num: [1] as number[] }));
	const reals = poles.filter(([, y]) => y === 0);
	// a complex zero pair needs a second-order section: pair up real poles when the pairs run out
	const zeroPairs = zeros.filter(([, y]) => y > 0);
	const zeroReals = zeros.filter(([, y]) => y === 0);
	const out: Section[] = [...pairs];
	while (zeroPairs.length > out.filter((s) => s.num.length === 1).length && reals.length >= 2) {
		const [p, q] = [reals.pop() as Root, reals.pop() as Root];
		out.push({ den: mul(linear(p), linear(q)), num: [1] });
	}
	for (const p of reals) out.push({ den: linear(p), num: [1] });
	for (const z of zeroPairs) {
		const s = out.find((x) => x.den.length === 3 && x.num.length === 1);
		if (s) s.num = quadratic(z);
	}
	for (const z of zeroReals) {
		const s = out.find((x) => x.num.length < x.den.length);
		if (!s) throw new Error('cascade: more zeros than poles');
		s.num = mul(s.num, linear(z));
	}
	if (zeroPairs.length > out.filter((x) => x.den.length === 3 && x.num.length === 3).length)
		throw new Error('cascade: a complex zero pair found no second-order section');
	return out;
}

/** Controllable canonical form of one monic section. */
function sectionRealisation({ den, num }: Section): Realisation {
	const n = den.length - 1;
	const d = num.length - 1 === n ? num[n] : 0;
	const strict = num.map((x, i) => x - d * den[i]);
	const a: Matrix = Array.from({ length: n }, () => new Array<number>(n).fill(0));
	for (let i = 0; i < n - 1; i++) a[i][i + 1] = 1;
	for (let j = 0; j < n; j++) a[n - 1][j] = -den[j];
	const b = new Array<number>(n).fill(0);
	b[n - 1] = 1;
	return { a, b, c: Array.from({ length: n }, (_, j) => strict[j] ?? 0), d };
}

/** Series connection: u → first → second → y. */
function series(first: Realisation, second: Realisation): Realisation {
	const n1 = first.a.length;
	const n2 = second.a.length;
	const n = n1 + n2;
	const a: Matrix = Array.from({ length: n }, () => new Array<number>(n).fill(0));
	for (let i = 0; i < n1; i++) for (let j = 0; j < n1; j++) a[i][j] = first.a[i][j];
	for (let i = 0; i < n2; i++) {
		for (let j = 0; j < n1; j++) a[n1 + i][j] = second.b[i] * first.c[j];
		for (let j = 0; j < n2; j++) a[n1 + i][n1 + j] = second.a[i][j];
	}
	return {
		a,
		b: [...first.b, ...second.b.map((x) => x * first.d)],
		c: [...first.c.map((x) => x * second.d), ...second.c],
		d: first.d * second.d
	};
}

/** gain · Π(s − zᵢ)/Π(s − pᵢ) as a cascade (a proper block: no more zeros than poles). */
export function cascade(zeros: Roots, poles: Roots, gain: number): Realisation {
	let r: Realisation = { a: [], b: [], c: [], d: gain };
	for (const s of sections(list(poles), list(zeros))) r = series(r, sectionRealisation(s));
	return r;
}
