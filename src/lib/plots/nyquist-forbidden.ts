/**
 * The region of the Nyquist plane that a requirement's targets forbid: the disc |1 + L| < the
 * required modulus margin (the larger of min modulus margin and 1 / max peak sensitivity), the
 * segments of the negative real axis the gain-margin targets rule out, the arc of the unit circle
 * within ±PM of −1, and the Apollonius disc the disk-margin target rules out.
 */
import type { Targets } from '../compliance/criteria';
import type { ForbiddenRegion } from './nyquist-types';
import { arcPoints, clipPolyline, polygonPath, polylinesPath, type Pt, type Rect } from './path';
import { formatNumber } from './ticks';

const present = (v: string | null | undefined): v is string =>
	v !== null && v !== undefined && v !== '';
const num = (v: string | null | undefined) => (present(v) ? Number(v) : NaN);

/** Disc radius around −1 the targets forbid (0 when they set none). */
export function forbiddenRadius(targets: Targets | null | undefined): number {
	const mm = num(targets?.minModulusMargin);
	const ms = num(targets?.maxPeakSensitivity);
	return Math.max(mm > 0 ? mm : 0, ms > 0 ? 1 / ms : 0);
}

/** Balanced disk margin α for a disk gain margin in dB (inverse of 20·log10((2+α)/(2−α))). */
export function alphaOfDiskGainDb(db: number): number {
	const g = 10 ** (db / 20);
	return (2 * (g - 1)) / (g + 1);
}

export function forbiddenRegion(
	targets: Targets | null,
	toPx: (re: number, im: number) => Pt,
	frame: Rect
): ForbiddenRegion {
	const description: string[] = [];
	const r = forbiddenRadius(targets);
	let disc: ForbiddenRegion['disc'] = null;
	if (r > 0) {
		const label = `|1 + L| below ${formatNumber(r, 3)} (within ${formatNumber(r, 3)} of −1)`;
		disc = {
			radius: r,
			label,
			path: polygonPath(arcPoints(-1, 0, r, 0, 2 * Math.PI).map(([a, b]) => toPx(a, b)))
		};
		description.push(`Forbidden: ${label}.`);
	}
	let diskMarginDisc: ForbiddenRegion['diskMarginDisc'] = null;
	const dgm = num(targets?.minDiskGainMarginDb);
	if (dgm > 0) {
		const alpha = alphaOfDiskGainDb(dgm);
		const q = alpha / 2; // |1 + L| < q·|1 − L|, q < 1
		const centre = (-1 - q * q) / (1 - q * q);
		const radius = (2 * q) / (1 - q * q);
		const label = `disk margin below α = ${formatNumber(alpha, 3)} (disk gain margin ${formatNumber(dgm, 3)} dB)`;
		diskMarginDisc = {
			alpha,
			centre,
			radius,
			label,
			path: polygonPath(arcPoints(centre, 0, radius, 0, 2 * Math.PI).map(([a, b]) => toPx(a, b)))
		};
		description.push(`Forbidden: ${label}.`);
	}
	const gainSegments: ForbiddenRegion['gainSegments'] = [];
	const seg = (from: number, to: number, label: string) => {
		gainSegments.push({
			from,
			to,
			label,
			path: polylinesPath(clipPolyline([toPx(from, 0), toPx(to, 0)], frame))
		});
		description.push(`Forbidden: crossing the negative real axis ${label}.`);
	};
	const up = num(targets?.minUpperGainMarginDb);
	if (up > 0)
		seg(
			-1,
			-(10 ** (-up / 20)),
			`between −1 and −${formatNumber(10 ** (-up / 20), 3)} (upper gain margin under ${formatNumber(up, 3)} dB)`
		);
	const low = num(targets?.minLowerGainMarginDb);
	if (low > 0)
		seg(
			-(10 ** (low / 20)),
			-1,
			`between −${formatNumber(10 ** (low / 20), 3)} and −1 (lower gain margin under ${formatNumber(low, 3)} dB)`
		);
	let phaseArc: ForbiddenRegion['phaseArc'] = null;
	const pm = num(targets?.minPhaseMarginDeg);
	if (pm > 0) {
		const a = (Math.min(pm, 180) * Math.PI) / 180;
		const label = `crossing the unit circle within ${formatNumber(pm, 3)}° of −1 (phase margin under ${formatNumber(pm, 3)}°)`;
		phaseArc = {
			degrees: pm,
			label,
			path: polylinesPath(
				clipPolyline(
					arcPoints(0, 0, 1, Math.PI - a, Math.PI + a).map(([p, q]) => toPx(p, q)),
					frame
				)
			)
		};
		description.push(`Forbidden: ${label}.`);
	}
	return { disc, diskMarginDisc, gainSegments, phaseArc, description };
}
