/**
 * Eigenvalues of a real upper Hessenberg matrix by the Francis double-shift QR iteration
 * (the EISPACK `hqr` scheme), preceded by radix-2 balancing. Written out on a flat typed array
 * because `numeric.eig` computes eigenvectors too and costs milliseconds on a 10×10 companion
 * matrix, far over the engine's budget, and throws on the companion matrices of xⁿ − c.
 *
 * Matrices are stored 1-based in a Float64Array of (n+1)² entries: a[i·(n+1) + j] (indexing is
 * written out inline: a closure accessor costs V8 a factor of two here).
 */

const RADIX = 2;

/** Diagonal similarity by powers of two so rows and columns have comparable norms (exact). */
export function balance(a: Float64Array, n: number): void {
	const w = n + 1;
	const sqrdx = RADIX * RADIX;
	for (let sweep = 0; sweep < 200; sweep++) {
		let done = true;
		for (let i = 1; i <= n; i++) {
			let r = 0;
			let c = 0;
			for (let j = 1; j <= n; j++)
				if (j !== i) {
					c += Math.abs(a[j * w + i]);
					r += Math.abs(a[i * w + j]);
				}
			if (c === 0 || r === 0) continue;
			let g = r / RADIX;
			let f = 1;
			const s = c + r;
			while (c < g && f < 1e150) {
				f *= RADIX;
				c *= sqrdx;
			}
			g = r * RADIX;
			while (c > g && f > 1e-150) {
				f /= RADIX;
				c /= sqrdx;
			}
			if ((c + r) / f < 0.95 * s) {
				done = false;
				const gi = 1 / f;
				for (let j = 1; j <= n; j++) a[i * w + j] *= gi;
				for (let j = 1; j <= n; j++) a[j * w + i] *= f;
			}
		}
		if (done) return;
	}
}

/**
 * Overwrites `a` (upper Hessenberg, 1-based) and writes the eigenvalues to wr/wi (0-based).
 * Returns false when an eigenvalue does not converge; the caller then tries another method.
 */
export function hqr(a: Float64Array, n: number, wr: Float64Array, wi: Float64Array): boolean {
	const w = n + 1;
	let anorm = 0;
	for (let i = 1; i <= n; i++)
		for (let j = Math.max(i - 1, 1); j <= n; j++) anorm += Math.abs(a[i * w + j]);
	let nn = n;
	let t = 0;
	let p = 0;
	let q = 0;
	let r = 0;
	let x: number;
	let y: number;
	let z: number;
	let ww: number;
	while (nn >= 1) {
		let its = 0;
		let l: number;
		do {
			for (l = nn; l >= 2; l--) {
				let s = Math.abs(a[(l - 1) * w + l - 1]) + Math.abs(a[l * w + l]);
				if (s === 0) s = anorm;
				if (Math.abs(a[l * w + l - 1]) + s === s) {
					a[l * w + l - 1] = 0;
					break;
				}
			}
			x = a[nn * w + nn];
			if (l === nn) {
				wr[nn - 1] = x + t;
				wi[nn - 1] = 0;
				nn--;
			} else {
				y = a[(nn - 1) * w + nn - 1];
				ww = a[nn * w + nn - 1] * a[(nn - 1) * w + nn];
				if (l === nn - 1) {
					p = 0.5 * (y - x);
					q = p * p + ww;
					z = Math.sqrt(Math.abs(q));
					x += t;
					if (q >= 0) {
						z = p + (p >= 0 ? Math.abs(z) : -Math.abs(z));
						wr[nn - 2] = wr[nn - 1] = x + z;
						if (z !== 0) wr[nn - 1] = x - ww / z;
						wi[nn - 2] = wi[nn - 1] = 0;
					} else {
						wr[nn - 2] = wr[nn - 1] = x + p;
						wi[nn - 2] = -z;
						wi[nn - 1] = z;
					}
					nn -= 2;
				} else {
					if (its === 60) return false;
					if (its > 0 && its % 10 === 0) {
						// exceptional shift: breaks the symmetric stalls of cyclic (xⁿ − c) matrices
						t += x;
						for (let i = 1; i <= nn; i++) a[i * w + i] -= x;
						const s = Math.abs(a[nn * w + nn - 1]) + Math.abs(a[(nn - 1) * w + nn - 2]);
						y = x = 0.75 * s;
						ww = -0.4375 * s * s;
						if (its % 20 === 0) {
							x *= 1.1;
							y = x;
						}
					}
					++its;
					let m: number;
					for (m = nn - 2; m >= l; m--) {
						z = a[m * w + m];
						r = x - z;
						const s0 = y - z;
						p = (r * s0 - ww) / a[(m + 1) * w + m] + a[m * w + m + 1];
						q = a[(m + 1) * w + m + 1] - z - r - s0;
						r = a[(m + 2) * w + m + 1];
						const s = Math.abs(p) + Math.abs(q) + Math.abs(r);
						p /= s;
						q /= s;
						r /= s;
						if (m === l) break;
						const u = Math.abs(a[m * w + m - 1]) * (Math.abs(q) + Math.abs(r));
						const v =
							Math.abs(p) *
							(Math.abs(a[(m - 1) * w + m - 1]) + Math.abs(z) + Math.abs(a[(m + 1) * w + m + 1]));
						if (u + v === v) break;
					}
					for (let i = m + 2; i <= nn; i++) {
						a[i * w + i - 2] = 0;
						if (i !== m + 2) a[i * w + i - 3] = 0;
					}
					for (let k = m; k <= nn - 1; k++) {
						if (k !== m) {
							p = a[k * w + k - 1];
							q = a[(k + 1) * w + k - 1];
							r = k !== nn - 1 ? a[(k + 2) * w + k - 1] : 0;
							x = Math.abs(p) + Math.abs(q) + Math.abs(r);
							if (x !== 0) {
								p /= x;
								q /= x;
								r /= x;
							}
						}
						const norm = Math.sqrt(p * p + q * q + r * r);
						const s = p >= 0 ? norm : -norm;
						if (s !== 0) {
							if (k === m) {
								if (l !== m) a[k * w + k - 1] = -a[k * w + k - 1];
							} else a[k * w + k - 1] = -s * x;
							p += s;
							x = p / s;
							y = q / s;
							z = r / s;
							q /= p;
							r /= p;
							for (let j = k; j <= nn; j++) {
								p = a[k * w + j] + q * a[(k + 1) * w + j];
								if (k !== nn - 1) {
									p += r * a[(k + 2) * w + j];
									a[(k + 2) * w + j] -= p * z;
								}
								a[(k + 1) * w + j] -= p * y;
								a[k * w + j] -= p * x;
							}
							const mmin = nn < k + 3 ? nn : k + 3;
							for (let i = l; i <= mmin; i++) {
								p = x * a[i * w + k] + y * a[i * w + k + 1];
								if (k !== nn - 1) {
									p += z * a[i * w + k + 2];
									a[i * w + k + 2] -= p * r;
								}
								a[i * w + k + 1] -= p * q;
								a[i * w + k] -= p;
							}
						}
					}
				}
			}
		} while (l < nn - 1);
	}
	return true;
}
