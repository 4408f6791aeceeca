/**
 * From one case's crossovers, stability and sensitivity to the published figures, by the
 * definitions of MODEL-FORMAT.md. Every path (rational, delayed, measured) ends here.
 */
import type { Crossing } from './crossovers';
import type { GainInterval } from './gain-margins';
import type { Sensitivity } from './sensitivity';
import type { CaseResult, DiskMargin } from './types';

export interface CaseAnalysis {
	name: string;
	/** Sample time of a sampled loop (its internal frequency is θ = ωT), else null. */
	T: number | null;
	gain: Crossing[];
	phase: Crossing[];
	unstablePoles: number;
	interval: GainInterval | null;
	sensitivity: Sensitivity;
	closedLoopPoles?: [number, number][];
	measuredOnly?: boolean;
}

const DEG = 180 / Math.PI;

export const radPerSecond = (a: { T: number | null }, f: number): number =>
	a.T === null ? f : f / a.T;

const hzOf = (a: { T: number | null }, f: number): number | null =>
	Number.isFinite(f) ? radPerSecond(a, f) / (2 * Math.PI) : null;

/** 180° + ∠L wrapped to (−180°, 180°]. */
export function phaseMarginDeg(re: number, im: number): number {
	const pm = 180 + Math.atan2(im, re) * DEG;
	return pm > 180 ? pm - 360 : pm;
}

export const gainMarginDb = (re: number, im: number): number =>
	-20 * Math.log10(Math.hypot(re, im));

export function diskMargin(alpha: number): DiskMargin {
	return {
		alpha,
		gainDb: alpha < 2 ? 20 * Math.log10((2 + alpha) / (2 - alpha)) : null,
		phaseDeg: 2 * Math.atan(alpha / 2) * DEG
	};
}

export function toCaseResult(a: CaseAnalysis): CaseResult {
	const stable = a.unstablePoles === 0;
	const gainCrossovers = a.gain.map((c) => ({
		hz: hzOf(a, c.f) as number,
		phaseMarginDeg: phaseMarginDeg(c.re, c.im)
	}));
	const phaseCrossovers = a.phase.map((c) => ({
		hz: hzOf(a, c.f) as number,
		gainMarginDb: gainMarginDb(c.re, c.im)
	}));
	let pm: { deg: number; hz: number } | null = null;
	let delay: number | null = null;
	a.gain.forEach((c, i) => {
		const deg = gainCrossovers[i].phaseMarginDeg;
		if (!pm || Math.abs(deg) < Math.abs(pm.deg)) pm = { deg, hz: gainCrossovers[i].hz };
		const seconds = (((deg % 360) + 360) % 360) / DEG / radPerSecond(a, c.f);
		if (delay === null || seconds < delay) delay = seconds;
	});
	const high = stable ? (a.interval?.high ?? null) : null;
	const low = stable ? (a.interval?.low ?? null) : null;
	const s = a.sensitivity;
	const modulus = Number.isFinite(s.modulus) ? s.modulus : null;
	const picked = pm as { deg: number; hz: number } | null;
	const delaySeconds = stable ? (delay as number | null) : null;
	const result: CaseResult = {
		name: a.name,
		stable,
		unstablePoles: a.unstablePoles,
		upperGainMarginDb: high ? 20 * Math.log10(high.k) : null,
		upperGainMarginHz: high ? hzOf(a, high.f) : null,
		lowerGainMarginDb: low ? 20 * Math.log10(low.k) : null,
		lowerGainMarginHz: low ? hzOf(a, low.f) : null,
		phaseMarginDeg: picked ? picked.deg : null,
		phaseMarginHz: picked ? picked.hz : null,
		delayMarginSeconds: delaySeconds,
		delayMarginSamples: delaySeconds !== null && a.T !== null ? delaySeconds / a.T : null,
		modulusMargin: modulus,
		peakSensitivity: modulus === null ? null : modulus === 0 ? null : 1 / modulus,
		peakSensitivityHz: modulus === null ? null : hzOf(a, s.modulusF),
		diskMargin: stable && s.half > 0 && Number.isFinite(s.half) ? diskMargin(1 / s.half) : null,
		gainCrossovers,
		phaseCrossovers
	};
	if (a.closedLoopPoles) result.closedLoopPoles = a.closedLoopPoles;
	if (a.measuredOnly) result.measuredOnly = true;
	return result;
}
