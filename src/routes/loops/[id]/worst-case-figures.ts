/** The worst-case figures the loop page lists beside its plots, in words. */
import type { WorstCase } from '$lib/margins/types';
import { formatHz, formatNumber } from '$lib/plots';

/** A gain offset as the slider states it: "+3.0 dB", "−6.0 dB", "±0.0 dB". */
export const signedDb = (v: number) =>
	`${v > 0 ? '+' : v < 0 ? '−' : '±'}${Math.abs(v).toFixed(1)} dB`;

const figure = (v: number | null, unit: string, none = 'unbounded') =>
	v === null ? none : `${formatNumber(v, 4)}${unit}`;

export interface Figure {
	label: string;
	value: string;
	/** The operating case the figure comes from. */
	from: string | undefined;
}

export function worstCaseFigures(w: WorstCase): Figure[] {
	return [
		{
			label: 'Closed loop',
			value: w.stable
				? 'stable'
				: `unstable (${w.unstablePoles} pole${w.unstablePoles === 1 ? '' : 's'})`,
			from: undefined
		},
		{
			label: 'Upper gain margin',
			value: figure(w.upperGainMarginDb, ' dB'),
			from: w.from.upperGainMarginDb
		},
		{
			label: 'Lower gain margin',
			value: figure(w.lowerGainMarginDb, ' dB'),
			from: w.from.lowerGainMarginDb
		},
		{
			label: 'Phase margin',
			value: figure(w.phaseMarginDeg, '°', 'no crossover'),
			from: w.from.phaseMarginDeg
		},
		{
			label: 'Delay margin',
			// a sampled loop's also in samples, the unit its class may set the target in
			value:
				figure(w.delayMarginSeconds, ' s', '—') +
				(w.delayMarginSeconds !== null && w.delayMarginSamples !== null
					? ` (${formatNumber(w.delayMarginSamples, 4)} samples)`
					: ''),
			from: w.from.delayMarginSeconds
		},
		{
			label: 'Modulus margin',
			value: figure(w.modulusMargin, '', '—'),
			from: w.from.modulusMargin
		},
		{
			label: 'Peak sensitivity',
			value:
				w.peakSensitivity === null
					? '—'
					: `${formatNumber(w.peakSensitivity, 4)}${w.peakSensitivityHz ? ` at ${formatHz(w.peakSensitivityHz)}` : ''}`,
			from: w.from.peakSensitivity
		},
		{
			label: 'Disk margin',
			value: w.diskMargin
				? `${w.diskMargin.gainDb === null ? 'unbounded' : `${formatNumber(w.diskMargin.gainDb, 3)} dB`}, ${formatNumber(w.diskMargin.phaseDeg, 3)}°`
				: '—',
			from: w.from.diskMargin
		}
	];
}
