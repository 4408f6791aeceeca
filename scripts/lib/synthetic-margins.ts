/**
 * Margin results with chosen worst-case figures, for tests and benchmarks that need judged
 * loops without running the engine on a model for each (the engine has its own suites). The
 * shape is the engine's `headroom-margins/1` result: one case, the worst case equal to it.
 */
import type { MarginsResult } from '../../src/lib/margins/types';

export interface SyntheticFigures {
	phaseMarginDeg: number;
	upperGainMarginDb: number | null;
	delayMarginSeconds: number;
	modulusMargin: number;
	crossoverHz?: number;
	stable?: boolean;
	caseName?: string;
}

export function syntheticResult(f: SyntheticFigures): MarginsResult {
	const name = f.caseName ?? 'nominal';
	const hz = f.crossoverHz ?? 100;
	const stable = f.stable ?? true;
	const figures = {
		stable,
		unstablePoles: stable ? 0 : 1,
		upperGainMarginDb: stable ? f.upperGainMarginDb : null,
		upperGainMarginHz: stable && f.upperGainMarginDb !== null ? hz * 4 : null,
		lowerGainMarginDb: null,
		lowerGainMarginHz: null,
		phaseMarginDeg: f.phaseMarginDeg,
		phaseMarginHz: hz,
		delayMarginSeconds: f.delayMarginSeconds,
		delayMarginSamples: null,
		modulusMargin: f.modulusMargin,
		peakSensitivity: 1 / f.modulusMargin,
		peakSensitivityHz: hz * 1.5,
		diskMargin: null
	};
	const from = Object.fromEntries(Object.keys(figures).map((k) => [k, name]));
	return {
		format: 'headroom-margins/1',
		engine: 'synthetic',
		cases: [{ name, ...figures, gainCrossovers: [{ hz, phaseMarginDeg: f.phaseMarginDeg }], phaseCrossovers: [] }],
		worstCase: { ...figures, from }
	};
}
