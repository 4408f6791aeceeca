/** Reading the engine's sampled response: nearest point and interpolated values by frequency. */
import type { ResponsePoint } from '../margins/sampler';

/** Index of the point nearest to `hz` in log frequency (points ascending in hz). */
export function nearestIndex(points: readonly ResponsePoint[], hz: number): number {
	if (points.length === 0) return -1;
	let lo = 0;
	let hi = points.length - 1;
	while (hi - lo > 1) {
		const mid = (lo + hi) >> 1;
		if (points[mid].hz < hz) lo = mid;
		else hi = mid;
	}
	const dl = Math.abs(Math.log(hz / points[lo].hz));
	const dh = Math.abs(Math.log(hz / points[hi].hz));
	return dh < dl ? hi : lo;
}

/** A response value interpolated linearly in log frequency; NaN outside the sampled band. */
export function valueAt(
	points: readonly ResponsePoint[],
	hz: number,
	key: 'magnitudeDb' | 'phaseDeg'
): number {
	const n = points.length;
	if (n === 0 || hz < points[0].hz || hz > points[n - 1].hz) return NaN;
	let lo = 0;
	let hi = n - 1;
	while (hi - lo > 1) {
		const mid = (lo + hi) >> 1;
		if (points[mid].hz <= hz) lo = mid;
		else hi = mid;
	}
	const a = points[lo];
	const b = points[hi];
	if (a.hz === hz || lo === hi) return a[key];
	if (b.hz === hz) return b[key];
	const t = Math.log(hz / a.hz) / Math.log(b.hz / a.hz);
	return a[key] + (b[key] - a[key]) * t;
}

/** The critical line −180 + k·360 nearest to `deg`. */
export function criticalLineNear(deg: number): number {
	return -180 + 360 * Math.round((deg + 180) / 360);
}
