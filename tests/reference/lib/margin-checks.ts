/**
 * Checks of the summary figures (definitions, stability interval, Skogestad–Postlethwaite bounds)
 * of one engine result; the crossover checks themselves live in checks.ts.
 */
import type { CaseResult } from '../../../src/lib/margins/types';
import { Findings, type LoopUnderTest } from './checks';
import { TWO_PI } from './engine';

/** The summary figures follow the definitions from the crossover lists. */
export function selectionChecks(f: Findings, t: LoopUnderTest, c: CaseResult) {
	f.ok(
		t.label,
		(c.unstablePoles === 0) === c.stable,
		() => `stable ${c.stable} but unstablePoles ${c.unstablePoles}`
	);
	if (c.gainCrossovers.length === 0)
		f.ok(
			t.label,
			c.phaseMarginDeg === null && c.delayMarginSeconds === null,
			() => 'PM or delay margin without a gain crossover'
		);
	else {
		const best = c.gainCrossovers.reduce((a, b) =>
			Math.abs(b.phaseMarginDeg) < Math.abs(a.phaseMarginDeg) ? b : a
		);
		f.near(t.label, 'PM = the smallest |PMᵢ|', c.phaseMarginDeg, best.phaseMarginDeg, 1e-12);
		f.rel(t.label, 'PM frequency', c.phaseMarginHz, best.hz, 1e-12);
	}
	if (!c.stable) {
		f.ok(
			t.label,
			c.upperGainMarginDb === null && c.lowerGainMarginDb === null && c.delayMarginSeconds === null,
			() => 'unstable loop with a gain or delay margin'
		);
		return;
	}
	if (c.gainCrossovers.length > 0) {
		const dm = Math.min(
			...c.gainCrossovers.map(
				(g) => ((((g.phaseMarginDeg % 360) + 360) % 360) * Math.PI) / 180 / (g.hz * TWO_PI)
			)
		);
		f.rel(t.label, 'delay margin = min (PMᵢ mod 360°)/ωᵢ', c.delayMarginSeconds, dm, 1e-9);
		if (t.sampleTimeSeconds)
			f.rel(
				t.label,
				'delay margin in samples',
				c.delayMarginSamples,
				dm / t.sampleTimeSeconds,
				1e-9
			);
		else
			f.ok(
				t.label,
				c.delayMarginSamples === null,
				() => 'delay margin in samples for a continuous loop'
			);
	}
	for (const [side, db, hzValue] of [
		['upper', c.upperGainMarginDb, c.upperGainMarginHz],
		['lower', c.lowerGainMarginDb, c.lowerGainMarginHz]
	] as const) {
		if (db === null) continue;
		f.ok(
			t.label,
			side === 'upper' ? db > 0 : db < 0,
			() => `${side} gain margin ${db} dB has the wrong sign`
		);
		f.ok(
			t.label,
			c.phaseCrossovers.some(
				(p) =>
					Math.abs(p.gainMarginDb - db) <= 1e-9 &&
					Math.abs(p.hz - (hzValue ?? NaN)) <= 1e-12 * (p.hz || 1)
			),
			() => `${side} gain margin ${db} dB at ${hzValue} Hz is not one of the phase crossovers`
		);
	}
}

/** The gain interval really is the stability interval: checked by an independent test at k(1 ± 1e-4). */
export function gainIntervalChecks(
	f: Findings,
	t: LoopUnderTest,
	c: CaseResult,
	stableAt: (k: number) => boolean
) {
	if (!c.stable) return;
	const kh = c.upperGainMarginDb === null ? null : 10 ** (c.upperGainMarginDb / 20);
	const kl = c.lowerGainMarginDb === null ? null : 10 ** (c.lowerGainMarginDb / 20);
	const expectAt = (k: number, stable: boolean, why: string) =>
		f.ok(
			t.label,
			stableAt(k) === stable,
			() => `gain ×${k}: expected ${stable ? 'stable' : 'unstable'} (${why})`
		);
	if (kh !== null) {
		expectAt(kh * (1 - 1e-4), true, `just below the upper margin ${c.upperGainMarginDb} dB`);
		expectAt(kh * (1 + 1e-4), false, `just above the upper margin ${c.upperGainMarginDb} dB`);
	} else expectAt(1e3, true, 'upper margin reported unbounded');
	if (kl !== null) {
		expectAt(kl * (1 + 1e-4), true, `just above the lower margin ${c.lowerGainMarginDb} dB`);
		expectAt(kl * (1 - 1e-4), false, `just below the lower margin ${c.lowerGainMarginDb} dB`);
	} else expectAt(1e-3, true, 'lower margin reported unbounded');
}

/** Skogestad & Postlethwaite 2005 §2.4.3 [mem]: GM ≥ Ms/(Ms−1), |PM| ≥ 2·asin(1/(2Ms)). */
export function boundChecks(f: Findings, t: LoopUnderTest, c: CaseResult) {
	if (!c.stable || c.peakSensitivity === null) return;
	const ms = c.peakSensitivity;
	if (c.upperGainMarginDb !== null) {
		const k = 10 ** (c.upperGainMarginDb / 20);
		f.ok(
			t.label,
			ms > 1 && k >= (ms / (ms - 1)) * (1 - 1e-9),
			() => `upper GM ×${k} < Ms/(Ms−1) = ${ms / (ms - 1)} (Ms ${ms})`
		);
	}
	// the same inequality |1 + L| ≥ 1/Ms at a crossover with |L| > 1 bounds the lower margin
	if (c.lowerGainMarginDb !== null) {
		const k = 10 ** (c.lowerGainMarginDb / 20);
		f.ok(
			t.label,
			k <= (ms / (ms + 1)) * (1 + 1e-9),
			() => `lower GM ×${k} > Ms/(Ms+1) = ${ms / (ms + 1)}`
		);
	}
	const pmBound = (2 * Math.asin(Math.min(1, 1 / (2 * ms))) * 180) / Math.PI;
	for (const g of c.gainCrossovers)
		f.ok(
			t.label,
			Math.abs(g.phaseMarginDeg) >= pmBound * (1 - 1e-9),
			() => `|PM| ${Math.abs(g.phaseMarginDeg)}° at ${g.hz} Hz < 2·asin(1/(2Ms)) = ${pmBound}°`
		);
}
