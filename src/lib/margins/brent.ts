/**
 * Brent's methods: root bracketing (zeroin) and one-dimensional minimisation (fmin). Used on
 * functions the algebra cannot reach (transport delay, measured data) and to refine grid minima.
 */

const EPS = 2.220446049250313e-16;

/** A root of f in [a, b] where f(a), f(b) differ in sign (or one is zero). */
export function brentRoot(
	f: (x: number) => number,
	a: number,
	b: number,
	fa = f(a),
	fb = f(b),
	tol = 1e-15
): number {
	if (fa === 0) return a;
	if (fb === 0) return b;
	let c = a;
	let fc = fa;
	let d = b - a;
	let e = d;
	for (let iter = 0; iter < 200; iter++) {
		if ((fb > 0 && fc > 0) || (fb < 0 && fc < 0)) {
			c = a;
			fc = fa;
			d = e = b - a;
		}
		if (Math.abs(fc) < Math.abs(fb)) {
			a = b;
			b = c;
			c = a;
			fa = fb;
			fb = fc;
			fc = fa;
		}
		const tol1 = 2 * EPS * Math.abs(b) + 0.5 * tol * Math.abs(b) + 1e-300;
		const xm = 0.5 * (c - b);
		if (Math.abs(xm) <= tol1 || fb === 0) return b;
		if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
			const s = fb / fa;
			let p: number;
			let q: number;
			if (a === c) {
				p = 2 * xm * s;
				q = 1 - s;
			} else {
				const qq = fa / fc;
				const r = fb / fc;
				p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
				q = (qq - 1) * (r - 1) * (s - 1);
			}
			if (p > 0) q = -q;
			p = Math.abs(p);
			if (2 * p < Math.min(3 * xm * q - Math.abs(tol1 * q), Math.abs(e * q))) {
				e = d;
				d = p / q;
			} else {
				d = xm;
				e = d;
			}
		} else {
			d = xm;
			e = d;
		}
		a = b;
		fa = fb;
		b += Math.abs(d) > tol1 ? d : xm > 0 ? tol1 : -tol1;
		fb = f(b);
	}
	return b;
}

/**
 * Brent's fmin from a given state: x the best point so far, w the second best, v the previous w;
 * e the step before last (0: start with a golden-section step).
 */
function fmin(
	f: (x: number) => number,
	a: number,
	b: number,
	tol: number,
	x: number,
	fx: number,
	w: number,
	fw: number,
	v: number,
	fv: number,
	e: number
): [number, number] {
	const golden = 0.3819660112501051;
	let d = e;
	for (let iter = 0; iter < 100; iter++) {
		const xm = 0.5 * (a + b);
		const tol1 = tol * (Math.abs(x) + 1);
		const tol2 = 2 * tol1;
		if (Math.abs(x - xm) <= tol2 - 0.5 * (b - a)) break;
		let parabolic = false;
		if (Math.abs(e) > tol1) {
			const r = (x - w) * (fx - fv);
			let q = (x - v) * (fx - fw);
			let p = (x - v) * q - (x - w) * r;
			q = 2 * (q - r);
			if (q > 0) p = -p;
			q = Math.abs(q);
			if (Math.abs(p) < Math.abs(0.5 * q * e) && p > q * (a - x) && p < q * (b - x)) {
				e = d;
				d = p / q;
				const u = x + d;
				if (u - a < tol2 || b - u < tol2) d = xm - x >= 0 ? tol1 : -tol1;
				parabolic = true;
			}
		}
		if (!parabolic) {
			e = x >= xm ? a - x : b - x;
			d = golden * e;
		}
		const u = Math.abs(d) >= tol1 ? x + d : x + (d >= 0 ? tol1 : -tol1);
		const fu = f(u);
		// plain assignments, not [v, fv, …] = [w, fw, …]: V8 builds and walks an array for those
		if (fu <= fx) {
			if (u >= x) a = x;
			else b = x;
			v = w;
			fv = fw;
			w = x;
			fw = fx;
			x = u;
			fx = fu;
		} else {
			if (u < x) a = u;
			else b = u;
			if (fu <= fw || w === x) {
				v = w;
				fv = fw;
				w = u;
				fw = fu;
			} else if (fu <= fv || v === x || v === w) {
				v = u;
				fv = fu;
			}
		}
	}
	return [x, fx];
}

/**
 * Minimum of a smooth f from a bracketing triple (a, m, b), f(m) ≤ f(a), f(b): Brent's fmin
 * started from the triple, so its first step is the parabola through the three points. A
 * well-resolved grid minimum costs a handful of evaluations instead of a fresh search; the
 * bracket's far end is pulled in by fmin's tol-sized steps once the parabolic steps get that
 * small, instead of being bisected towards the minimum.
 */
export function parabolicMin(
	f: (x: number) => number,
	a: number,
	fa: number,
	m: number,
	fm: number,
	b: number,
	fb: number,
	tol = 1e-10
): [number, number] {
	const [w, fw, v, fv] = fa <= fb ? [a, fa, b, fb] : [b, fb, a, fa];
	return fmin(f, a, b, tol, m, fm, w, fw, v, fv, b - a);
}
