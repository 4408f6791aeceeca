/**
 * One operating case as the numerics see it: L = gain · num/den (real polynomials in s or z,
 * ascending), times a transport delay, times any measured responses.
 */
import { rationalFactor, type Factor, type RationalBlock } from './blocks';
import { discretise } from './discretize';
import type { PathSegment } from './issues';
import { MAX_FOLDED_DELAY } from './limits';
import { maxAbs, mul, powerOfTwo, shiftUp, type Poly } from './polynomial';
import type { Block, LoopModel, MeasuredBlock } from './schema';

export interface MeasuredData {
	hz: number[];
	magnitudeDb: number[];
	/** Unwrapped: successive points never differ by more than 180°. */
	phaseDeg: number[];
}

export interface CaseLoop {
	name: string;
	T: number | null;
	/** Positive multiplier: case gain × what-if gain × the normalisation of num and den. */
	gain: number;
	/** Case gain × what-if gain alone: L = caseGain · Π(factor num / factor den). */
	caseGain: number;
	factors: Factor[];
	num: Poly;
	den: Poly;
	/** Continuous transport delay (seconds); 0 in sampled loops. */
	delaySeconds: number;
	/** Whole-sample delay too long to fold into den as z^k (sampled loops only). */
	delaySamples: number;
	/** Whole-sample delay folded into den as z^k (den = den₀·z^k). */
	foldedDelay: number;
	measured: MeasuredData[];
	measuredUnstable: number;
}

export type FactorCache = Map<Block, Factor>;

export function blockFactor(block: RationalBlock, T: number | null, path: PathSegment[]): Factor {
	const continuous = T === null || block.domain === 's';
	const f = rationalFactor(block, !continuous);
	if (T !== null && block.domain === 's' && block.discretize)
		return discretise(f, block.discretize, T, path);
	return f;
}

export function unwrapDegrees(phase: readonly number[]): number[] {
	const out = new Array<number>(phase.length);
	let offset = 0;
	for (let i = 0; i < phase.length; i++) {
		if (i > 0) {
			const step = phase[i] + offset - out[i - 1];
			offset -= 360 * Math.round(step / 360);
		}
		out[i] = phase[i] + offset;
	}
	return out;
}

function measuredData(block: MeasuredBlock): MeasuredData {
	return { hz: block.hz, magnitudeDb: block.magnitudeDb, phaseDeg: unwrapDegrees(block.phaseDeg) };
}

export interface CaseSource {
	name: string;
	gain: number;
	delaySeconds: number;
	blocks: Block[];
	/** JSON path of the block list, for refusals found while building. */
	path: PathSegment[];
}

/** The cases of a model as written: the single case "nominal" when there are none. */
export function caseSources(model: LoopModel): CaseSource[] {
	const delay = model.delaySeconds ?? 0;
	if (!model.cases)
		return [
			{ name: 'nominal', gain: 1, delaySeconds: delay, blocks: model.blocks, path: ['blocks'] }
		];
	return model.cases.map((c, i) => ({
		name: c.name,
		gain: c.gain ?? 1,
		delaySeconds: c.delaySeconds ?? delay,
		blocks: c.blocks ?? model.blocks,
		path: c.blocks ? ['cases', i, 'blocks'] : ['blocks']
	}));
}

export function buildCase(
	model: LoopModel,
	source: CaseSource,
	gainScale: number,
	cache?: FactorCache
): CaseLoop {
	const T = model.sampleTimeSeconds ?? null;
	const factors: Factor[] = [];
	const measured: MeasuredData[] = [];
	let measuredUnstable = 0;
	let num: Poly = [1];
	let den: Poly = [1];
	let gain = source.gain * gainScale;
	source.blocks.forEach((block, i) => {
		if (block.type === 'measured') {
			measured.push(measuredData(block));
			measuredUnstable += block.openLoopUnstablePoles;
			return;
		}
		let f = cache?.get(block);
		if (!f) {
			f = blockFactor(block, T, [...source.path, i]);
			cache?.set(block, f);
		}
		factors.push(f);
		// keep the running products near unit size; the scale moves into the gain exactly
		num = mul(num, f.num);
		den = mul(den, f.den);
		const sn = powerOfTwo(maxAbs(num));
		const sd = powerOfTwo(maxAbs(den));
		num = num.map((x) => x / sn);
		den = den.map((x) => x / sd);
		gain *= sn / sd;
	});
	let delaySeconds = source.delaySeconds;
	let delaySamples = 0;
	let foldedDelay = 0;
	if (T !== null) {
		const k = Math.round(delaySeconds / T);
		delaySeconds = 0;
		if (k > 0 && k <= MAX_FOLDED_DELAY) {
			foldedDelay = k;
			den = shiftUp(den, k);
			const zeros = new Float64Array(k);
			factors.push({ num: [1], den: shiftUp([1], k), poles: { re: zeros, im: zeros.slice() } });
		} else delaySamples = k;
	}
	const caseGain = source.gain * gainScale;
	return {
		name: source.name,
		T,
		gain,
		caseGain,
		factors,
		num,
		den,
		delaySeconds,
		delaySamples,
		foldedDelay,
		measured,
		measuredUnstable
	};
}

export function buildCases(model: LoopModel, gainScale = 1): CaseLoop[] {
	const cache: FactorCache = new Map();
	return caseSources(model).map((s) => buildCase(model, s, gainScale, cache));
}
