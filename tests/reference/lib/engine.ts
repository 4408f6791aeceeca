/**
 * The engine as the reference tests see it: models go in as `headroom-loop-model/1` JSON text, so
 * every check also proves the parser accepts the file, and frequencies come back in Hz.
 */
import { computeMargins, parseModelText } from '../../../src/lib/margins/index';
import type { CaseResult, MarginsResult } from '../../../src/lib/margins/types';
export { generatedResponse, ratio, tfResponse } from './response';

export const TWO_PI = 2 * Math.PI;
/** rad/s (as the sources print) → Hz (as the engine reports). */
export const hz = (radPerSecond: number) => radPerSecond / TWO_PI;

export function parse(model: Record<string, unknown>) {
	const parsed = parseModelText(JSON.stringify(model), 'reference.json');
	if (!parsed.ok)
		throw new Error(`engine refused a valid model: ${parsed.issue.path}: ${parsed.issue.message}`);
	return parsed.model;
}

export function margins(
	model: Record<string, unknown>,
	options?: { gainScale?: number }
): MarginsResult {
	return computeMargins(parse(model), options);
}

/** The only (or the named) case. */
export function caseOf(
	model: Record<string, unknown>,
	options?: { gainScale?: number },
	name?: string
): CaseResult {
	const result = margins(model, options);
	const found = name === undefined ? result.cases[0] : result.cases.find((c) => c.name === name);
	if (!found) throw new Error(`no case ${name ?? '#0'} in the result`);
	return found;
}

/** Polynomial-block model of a continuous loop num/den (descending powers of s). */
export function rational(num: number[], den: number[], extra: Record<string, unknown> = {}) {
	return {
		format: 'headroom-loop-model/1',
		blocks: [{ type: 'polynomial', numerator: num, denominator: den }],
		...extra
	};
}
