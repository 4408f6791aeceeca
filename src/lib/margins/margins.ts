/**
 * computeMargins: every case of a parsed model, then the worst case over them.
 */
import { toCaseResult, type CaseAnalysis } from './figures';
import { buildCases, type CaseLoop } from './loop';
import { rationalAnalysis } from './rational';
import { responseAnalysis } from './response-path';
import type { LoopModel } from './schema';
import { MARGINS_FORMAT, type MarginsResult } from './types';
import { worstCase } from './worst-case';
import { ENGINE_VERSION } from './version';

export interface MarginOptions {
	/** Multiplies L in every case (the what-if gain slider); > 0. */
	gainScale?: number;
}

export function gainScaleOf(options?: MarginOptions): number {
	const k = options?.gainScale ?? 1;
	if (!(k > 0) || !Number.isFinite(k))
		throw new RangeError(`gainScale must be a finite number > 0, got ${k}`);
	return k;
}

/** Rational loops get exact algebra; a continuous delay or measured data need the Nyquist route. */
export const isRational = (loop: CaseLoop): boolean =>
	loop.measured.length === 0 && loop.delaySeconds === 0 && loop.delaySamples === 0;

export function analyseCase(loop: CaseLoop): CaseAnalysis {
	return isRational(loop) ? rationalAnalysis(loop) : responseAnalysis(loop);
}

export function computeMargins(model: LoopModel, options?: MarginOptions): MarginsResult {
	const cases = buildCases(model, gainScaleOf(options)).map((loop) =>
		toCaseResult(analyseCase(loop))
	);
	return { format: MARGINS_FORMAT, engine: ENGINE_VERSION, cases, worstCase: worstCase(cases) };
}
