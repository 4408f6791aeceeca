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

/** Minimum of f on [a, b] (golden section with parabolic steps). Returns [x, f(x)]. */
export function brentMin(
	f: (x: number) => number,
	a: number,
	b: number,
	tol = 1e-10
): [number, number] {
	const golden = 0.3819660112501051;
	let x = a + golden * (b - a);
	let w = x;
	let v = x;
	let fx = f(x);
	let fw = fx;
	let fv = fx;
	let d = 0;
	let e = 0;
	for (let iter = 0; iter < 100; iter++) {
		const xm = 0.5 * (a + b);
		const tol1 = tol * Math.abs(x) + 1e-12;
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
		if (fu <= fx) {
			if (u >= x) a = x;
			else b = x;
			[v, fv, w, fw, x, fx] = [w, fw, x, fx, u, fu];
		} else {
			if (u < x) a = u;
			else b = u;
			if (fu <= fw || w === x) [v, fv, w, fw] = [w, fw, u, fu];
			else if (fu <= fv || v === x || v === w) [v, fv] = [u, fu];
		}
	}
	return [x, fx];
}

/**
 * Minimum of a smooth f from a bracketing triple (a, m, b), f(m) ≤ f(a), f(b), by successive
 * parabolic interpolation with bisection as the safeguard. The triple comes from a grid, so a
 * well-resolved minimum costs a handful of evaluations instead of a fresh Brent search.
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
	for (let iter = 0; iter < 40 && b - a > tol * (Math.abs(m) + 1); iter++) {
		const p = (m - a) * (fm - fb);
		const q = (m - b) * (fm - fa);
		const den = 2 * (p - q);
		let u = den !== 0 ? m - ((m - a) * p - (m - b) * q) / den : NaN;
		// stay strictly inside and off the middle point, or bisect the larger side
		const guard = 0.01 * (b - a);
		if (!(u > a + guard && u < b - guard) || Math.abs(u - m) < 1e-3 * tol)
			u = m - a > b - m ? 0.5 * (a + m) : 0.5 * (m + b);
		const fu = f(u);
		if (fu < fm) {
			if (u < m) [b, fb] = [m, fm];
			else [a, fa] = [m, fm];
			const step = Math.abs(u - m);
			[m, fm] = [u, fu];
			if (step <= tol * (Math.abs(m) + 1)) break;
		} else if (u < m) [a, fa] = [u, fu];
		else [b, fb] = [u, fu];
	}
	return [m, fm];
}
