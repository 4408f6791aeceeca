/**
 * Public types of the margin engine: the `headroom-margins/1` result (see shared MODEL-FORMAT.md).
 * Frequencies are Hz in every field; the engine may work in rad/s inside.
 */

export const MARGINS_FORMAT = 'headroom-margins/1' as const;

export interface GainCrossover {
	hz: number;
	phaseMarginDeg: number;
}

export interface PhaseCrossover {
	hz: number;
	gainMarginDb: number;
}

export interface DiskMargin {
	alpha: number;
	/** null when alpha >= 2 (the disk gain margin is unbounded). */
	gainDb: number | null;
	phaseDeg: number;
}

/** The margin figures shared by a case and the worst case. */
export interface MarginFigures {
	stable: boolean;
	unstablePoles: number;
	upperGainMarginDb: number | null;
	upperGainMarginHz: number | null;
	lowerGainMarginDb: number | null;
	lowerGainMarginHz: number | null;
	phaseMarginDeg: number | null;
	phaseMarginHz: number | null;
	delayMarginSeconds: number | null;
	delayMarginSamples: number | null;
	modulusMargin: number | null;
	peakSensitivity: number | null;
	peakSensitivityHz: number | null;
	diskMargin: DiskMargin | null;
}

export interface CaseResult extends MarginFigures {
	name: string;
	gainCrossovers: GainCrossover[];
	phaseCrossovers: PhaseCrossover[];
	/** Rational loops only: [re, im] pairs (s-plane, or z-plane for sampled loops). */
	closedLoopPoles?: [number, number][];
	/** True when the loop is evaluated on measured frequencies only. */
	measuredOnly?: boolean;
}

export type WorstCaseSource = Partial<Record<keyof MarginFigures, string>>;

export interface WorstCase extends MarginFigures {
	/** Which case each figure came from. */
	from: WorstCaseSource;
}

export interface MarginsResult {
	format: typeof MARGINS_FORMAT;
	engine: string;
	cases: CaseResult[];
	worstCase: WorstCase;
}

/** A refusal: what is wrong and where in the file (a JSON path such as `blocks[1].denominator`). */
export interface ModelIssue {
	message: string;
	path: string;
}
