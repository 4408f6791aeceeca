/**
 * A short, stable description of a model for showing what changed between two revisions.
 */
import { buildCase, caseSources } from './loop';
import type { Block, LoopModel } from './schema';

export interface ModelSummary {
	sampled: boolean;
	sampleTimeSeconds: number | null;
	delaySeconds: number | null;
	blocks: string[];
	cases: string[];
	/** Order of the nominal loop's rational part (whole-sample delay included); null with measured data. */
	order: number | null;
}

function describeBlock(b: Block): string {
	const via =
		b.type !== 'measured' && b.domain === 's' && b.discretize
			? ` (continuous, ${b.discretize})`
			: '';
	switch (b.type) {
		case 'polynomial':
			return `polynomial: numerator degree ${degree(b.numerator)}, denominator degree ${degree(b.denominator)}${via}`;
		case 'factored':
			return `factored: ${b.zeros?.length ?? 0} zeros, ${b.poles?.length ?? 0} poles, gain ${b.gain ?? 1}${via}`;
		case 'state-space':
			return `state-space: ${b.a.length} states${via}`;
		case 'pid':
			return `pid: kp ${b.kp ?? 0}, ki ${b.ki ?? 0}, kd ${b.kd ?? 0}, derivative filter ${b.derivativeFilterSeconds ?? 0} s${via}`;
		case 'measured':
			return `measured: ${b.hz.length} points, ${b.hz[0]} Hz to ${b.hz[b.hz.length - 1]} Hz, ${b.openLoopUnstablePoles} open-loop unstable poles`;
	}
}

/** Degree of a descending coefficient list, leading zeros ignored. */
function degree(c: number[]): number {
	const first = c.findIndex((x) => x !== 0);
	return first < 0 ? 0 : c.length - 1 - first;
}

export function summarizeModel(model: LoopModel): ModelSummary {
	let order: number | null = null;
	if (!model.blocks.some((b) => b.type === 'measured')) {
		try {
			const nominal = caseSources({ ...model, cases: undefined })[0];
			const loop = buildCase(model, nominal, 1);
			order = loop.den.length - 1 + loop.delaySamples;
		} catch {
			order = null;
		}
	}
	return {
		sampled: model.sampleTimeSeconds !== undefined,
		sampleTimeSeconds: model.sampleTimeSeconds ?? null,
		delaySeconds: model.delaySeconds ?? null,
		blocks: model.blocks.map(describeBlock),
		cases: model.cases ? model.cases.map((c) => c.name) : ['nominal'],
		order
	};
}
