/**
 * Aberth–Ehrlich simultaneous root iteration: the fallback when the companion-matrix QR does not
 * converge. Globally convergent in practice and indifferent to the matrix structure that stalls QR.
 */
import { hypot } from './hypot';

/** Roots of p (ascending, p[n] ≠ 0). Starts from `start` when given (e.g. rough QR roots). */
export function aberth(
	p: readonly number[],
	start?: { re: Float64Array; im: Float64Array }
): { re: Float64Array; im: Float64Array } {
	const n = p.length - 1;
	const re = new Float64Array(n);
	const im = new Float64Array(n);
	const dp = new Float64Array(n);
	for (let i = 1; i <= n; i++) dp[i - 1] = i * p[i];
	if (start) {
		re.set(start.re);
		im.set(start.im);
	} else {
		// radius from the coefficients' geometric growth; angles offset so no guess is real
		let radius = 0;
		for (let i = 0; i < n; i++)
			radius = Math.max(radius, Math.pow(Math.abs(p[i] / p[n]), 1 / (n - i)));
		if (!(radius > 0)) radius = 1;
		for (let k = 0; k < n; k++) {
			const a = (2 * Math.PI * k) / n + 0.4;
			re[k] = radius * Math.cos(a);
			im[k] = radius * Math.sin(a);
		}
	}
	const done = new Uint8Array(n);
	for (let iter = 0; iter < 800; iter++) {
		let moving = 0;
		for (let k = 0; k < n; k++) {
			if (done[k]) continue;
			const zr = re[k];
			const zi = im[k];
			// p(z) and p'(z) by Horner
			let pr = p[n];
			let pi = 0;
			for (let i = n - 1; i >= 0; i--) {
				const t = pr * zr - pi * zi + p[i];
				pi = pr * zi + pi * zr;
				pr = t;
			}
			let qr = dp[n - 1];
			let qi = 0;
			for (let i = n - 2; i >= 0; i--) {
				const t = qr * zr - qi * zi + dp[i];
				qi = qr * zi + qi * zr;
				qr = t;
			}
			if (pr === 0 && pi === 0) {
				done[k] = 1;
				continue;
			}
			// ratio = p/p'
			const qd = qr * qr + qi * qi;
			let rr: number;
			let ri: number;
			if (qd === 0) {
				rr = 1e-3 * (1 + Math.abs(zr));
				ri = 1e-3 * (1 + Math.abs(zi));
			} else {
				rr = (pr * qr + pi * qi) / qd;
				ri = (pi * qr - pr * qi) / qd;
			}
			// sum of 1/(z − z_j)
			let sr = 0;
			let si = 0;
			for (let j = 0; j < n; j++) {
				if (j === k) continue;
				const dr = zr - re[j];
				const di = zi - im[j];
				const d = dr * dr + di * di;
				if (d === 0) continue;
				sr += dr / d;
				si += -di / d;
			}
			// step = ratio / (1 − ratio·sum)
			const br = 1 - (rr * sr - ri * si);
			const bi = -(rr * si + ri * sr);
			const bd = br * br + bi * bi;
			const wr = bd === 0 ? rr : (rr * br + ri * bi) / bd;
			const wi = bd === 0 ? ri : (ri * br - rr * bi) / bd;
			re[k] = zr - wr;
			im[k] = zi - wi;
			const size = hypot(zr, zi);
			if (hypot(wr, wi) <= 1e-15 * (size + 1e-300)) done[k] = 1;
			else moving++;
		}
		if (moving === 0) break;
	}
	return { re, im };
}
