/**
 * The rules of the model format that a structural schema cannot express. The first problem found
 * is reported (one refusal names one thing to fix); order follows the file from top to bottom.
 */
import type { z } from 'zod';
import { ModelError, type PathSegment } from './issues';
import { MAX_DELAY_SAMPLES, MAX_LOOP_ORDER, SAMPLE_TOLERANCE } from './limits';
import { buildCase, caseSources, type FactorCache } from './loop';
import { rootOf } from './blocks';
import type { Block, LoopModel } from './schema';

type Problem = { path: PathSegment[]; problem: string };
const fail = (path: PathSegment[], problem: string): Problem => ({ path, problem });

/** Total rational order over every block list in the file: bounds the build work. */
const MAX_TOTAL_ORDER = 2048;

export function checkModel(model: LoopModel, ctx: z.RefinementCtx<LoopModel>): void {
	const found = firstProblem(model);
	if (found) ctx.addIssue({ code: 'custom', message: found.problem, path: found.path });
}

export function firstProblem(model: LoopModel): Problem | null {
	const T = model.sampleTimeSeconds ?? null;
	const top =
		checkDelay(model.delaySeconds, T, ['delaySeconds']) ?? checkBlocks(model.blocks, T, ['blocks']);
	if (top) return top;
	let totalOrder = listOrder(model.blocks);
	const names = new Map<string, number>();
	for (const [i, c] of (model.cases ?? []).entries()) {
		const seen = names.get(c.name);
		if (seen !== undefined)
			return fail(
				['cases', i, 'name'],
				`duplicate case name ${JSON.stringify(c.name)} (also cases[${seen}])`
			);
		names.set(c.name, i);
		const problem =
			checkDelay(c.delaySeconds, T, ['cases', i, 'delaySeconds']) ??
			(c.blocks ? checkBlocks(c.blocks, T, ['cases', i, 'blocks']) : null);
		if (problem) return problem;
		if (c.blocks) totalOrder += listOrder(c.blocks);
	}
	if (totalOrder > MAX_TOTAL_ORDER)
		return fail(
			[],
			`the blocks of all cases add up to order ${totalOrder}, above the limit of ${MAX_TOTAL_ORDER}`
		);
	return checkCases(model);
}

function checkDelay(
	delay: number | undefined,
	T: number | null,
	path: PathSegment[]
): Problem | null {
	if (delay === undefined || T === null) return null;
	const k = delay / T;
	if (Math.abs(k - Math.round(k)) > SAMPLE_TOLERANCE * Math.max(1, k))
		return fail(
			path,
			`${delay} s is ${k.toPrecision(6)} samples at T = ${T} s: a sampled loop needs a whole number of samples`
		);
	if (Math.round(k) > MAX_DELAY_SAMPLES)
		return fail(path, `${Math.round(k)} samples is more than the limit of ${MAX_DELAY_SAMPLES}`);
	return null;
}

function listOrder(blocks: Block[]): number {
	let n = 0;
	for (const b of blocks) {
		if (b.type === 'polynomial') n += Math.max(b.numerator.length, b.denominator.length);
		else if (b.type === 'factored') n += Math.max(b.zeros?.length ?? 0, b.poles?.length ?? 0);
		else if (b.type === 'state-space') n += b.a.length;
		else if (b.type === 'pid') n += 2;
	}
	return n;
}

function checkBlocks(blocks: Block[], T: number | null, path: PathSegment[]): Problem | null {
	for (const [i, b] of blocks.entries()) {
		const problem = checkDomain(b, T, [...path, i]) ?? checkBlock(b, T, [...path, i]);
		if (problem) return problem;
	}
	return null;
}

function checkDomain(b: Block, T: number | null, path: PathSegment[]): Problem | null {
	if (b.type === 'measured') {
		if (b.domain !== undefined || b.discretize !== undefined)
			return fail(
				path,
				'a measured block takes no "domain" or "discretize" (its frequencies are in Hz either way)'
			);
		return null;
	}
	if (T === null) {
		if (b.domain === 'z')
			return fail([...path, 'domain'], 'a z-domain block needs a sampled loop (sampleTimeSeconds)');
		if (b.discretize !== undefined)
			return fail(
				[...path, 'discretize'],
				'discretize applies only in a sampled loop, and this loop has no sampleTimeSeconds'
			);
		return null;
	}
	if (b.type === 'pid' && b.domain !== 's')
		return fail(
			path,
			'a pid block is continuous: in a sampled loop give it "domain": "s" and "discretize": "zoh" or "tustin"'
		);
	if (b.domain === 's' && b.discretize === undefined)
		return fail(
			[...path, 'discretize'],
			'a continuous ("domain": "s") block in a sampled loop needs "discretize": "zoh" or "tustin"'
		);
	if (b.discretize !== undefined && b.domain !== 's')
		return fail(
			[...path, 'domain'],
			'"discretize" applies to continuous blocks: add "domain": "s"'
		);
	return null;
}

function checkBlock(b: Block, T: number | null, path: PathSegment[]): Problem | null {
	switch (b.type) {
		case 'polynomial':
			return (
				checkCoefficients(b.numerator, [...path, 'numerator'], false) ??
				checkCoefficients(b.denominator, [...path, 'denominator'], true)
			);
		case 'factored':
			if (b.gain === 0) return fail([...path, 'gain'], 'gain is zero (the loop would be open)');
			return (
				checkConjugates(b.zeros ?? [], [...path, 'zeros']) ??
				checkConjugates(b.poles ?? [], [...path, 'poles'])
			);
		case 'state-space':
			return checkStateSpace(b, path);
		case 'pid': {
			if (!b.kp && !b.ki && !b.kd)
				return fail(path, 'all gains are zero (kp, ki and kd): the loop would be open');
			const tf = b.derivativeFilterSeconds ?? 0;
			if (tf < 0) return fail([...path, 'derivativeFilterSeconds'], `must be ≥ 0 (got ${tf})`);
			if (b.discretize === 'zoh' && b.kd && tf === 0)
				return fail(
					path,
					'zero-order hold needs a proper block: a derivative term needs derivativeFilterSeconds > 0'
				);
			return null;
		}
		case 'measured':
			return checkMeasured(b, T, path);
	}
}

function checkCoefficients(
	c: number[],
	path: PathSegment[],
	isDenominator: boolean
): Problem | null {
	const what = isDenominator ? 'denominator' : 'numerator';
	if (c.length === 0) return fail(path, `${what} is empty`);
	if (c.every((x) => x === 0))
		return fail(
			path,
			isDenominator ? 'denominator is zero' : 'numerator is zero (the loop would be open)'
		);
	// a numerator may be padded with leading zeros to the denominator's length; a denominator may not
	if (isDenominator && c[0] === 0) return fail(path, 'leading coefficient is zero');
	return null;
}

function checkConjugates(list: (number | [number, number])[], path: PathSegment[]): Problem | null {
	const used = new Uint8Array(list.length);
	for (const [i, r] of list.entries()) {
		const [re, im] = rootOf(r);
		if (im <= 0) continue;
		const tol = 1e-9 * Math.hypot(re, im);
		const j = list.findIndex((q, k) => {
			const [a, b] = rootOf(q);
			return !used[k] && b < 0 && Math.abs(a - re) <= tol && Math.abs(b + im) <= tol;
		});
		if (j < 0)
			return fail([...path, i], `complex root [${re}, ${im}] has no conjugate [${re}, ${-im}]`);
		used[j] = 1;
	}
	for (const [i, r] of list.entries()) {
		const [re, im] = rootOf(r);
		if (im < 0 && !used[i])
			return fail([...path, i], `complex root [${re}, ${im}] has no conjugate [${re}, ${-im}]`);
	}
	return null;
}

const count = (n: number, what: string) => `${n} ${what}${n === 1 ? '' : 's'}`;
const shape = (m: number[][]) => `${m.length}×${m[0]?.length ?? 0}`;

function checkStateSpace(
	b: Extract<Block, { type: 'state-space' }>,
	path: PathSegment[]
): Problem | null {
	const n = b.a.length;
	if (n === 0)
		return fail([...path, 'a'], 'is empty: a state-space block needs at least one state');
	for (const [i, row] of b.a.entries())
		if (row.length !== n)
			return fail([...path, 'a', i], `has ${row.length} entries, but a must be square (${n} rows)`);
	if (b.b.length !== n || b.b.some((row) => row.length !== 1))
		return fail([...path, 'b'], `must be ${n}×1 (one input, a is ${n}×${n}), got ${shape(b.b)}`);
	if (b.c.length !== 1 || b.c[0].length !== n)
		return fail([...path, 'c'], `must be 1×${n} (one output, a is ${n}×${n}), got ${shape(b.c)}`);
	if (b.d && (b.d.length !== 1 || b.d[0].length !== 1))
		return fail([...path, 'd'], `must be 1×1, got ${shape(b.d)}`);
	return null;
}

function checkMeasured(
	b: Extract<Block, { type: 'measured' }>,
	T: number | null,
	path: PathSegment[]
): Problem | null {
	const n = b.hz.length;
	if (b.magnitudeDb.length !== n)
		return fail([...path, 'magnitudeDb'], `has ${b.magnitudeDb.length} points but hz has ${n}`);
	if (b.phaseDeg.length !== n)
		return fail([...path, 'phaseDeg'], `has ${b.phaseDeg.length} points but hz has ${n}`);
	if (!(b.hz[0] > 0)) return fail([...path, 'hz', 0], `must be > 0 (got ${b.hz[0]})`);
	for (let i = 1; i < n; i++)
		if (!(b.hz[i] > b.hz[i - 1]))
			return fail(
				[...path, 'hz', i],
				`hz must be strictly increasing: ${b.hz[i]} does not exceed hz[${i - 1}] = ${b.hz[i - 1]}`
			);
	if (T !== null) {
		const nyquist = 1 / (2 * T);
		if (b.hz[n - 1] > nyquist * (1 + 1e-9))
			return fail(
				[...path, 'hz', n - 1],
				`${b.hz[n - 1]} Hz is above the Nyquist frequency 1/(2T) = ${nyquist} Hz`
			);
	}
	return null;
}

function checkCases(model: LoopModel): Problem | null {
	const cache: FactorCache = new Map();
	const seen = new Set<Block[]>();
	for (const source of caseSources(model)) {
		if (seen.has(source.blocks)) continue;
		seen.add(source.blocks);
		let loop;
		try {
			loop = buildCase(model, { ...source, delaySeconds: 0 }, 1, cache);
		} catch (e) {
			if (e instanceof ModelError) return fail(e.path, e.problem);
			throw e;
		}
		const measured = source.blocks.filter((b) => b.type === 'measured');
		if (measured.length > 1) {
			const lo = Math.max(...measured.map((b) => b.hz[0]));
			const hi = Math.min(...measured.map((b) => b.hz[b.hz.length - 1]));
			if (!(lo < hi))
				return fail(
					source.path,
					`the measured blocks share no frequency range (${lo} Hz to ${hi} Hz is empty)`
				);
		}
		const zeros = loop.num.length - 1;
		const poles = loop.den.length - 1;
		// a measured response is only evaluated on its own band, where an improper factor is harmless
		if (measured.length === 0 && zeros > poles)
			return fail(
				source.path,
				`improper loop: the blocks have ${count(zeros, 'zero')} and ${count(poles, 'pole')} in total (more zeros than poles)`
			);
		if (poles > MAX_LOOP_ORDER)
			return fail(source.path, `the loop order ${poles} exceeds the limit of ${MAX_LOOP_ORDER}`);
		if (![...loop.num, ...loop.den, loop.gain].every(Number.isFinite) || !(loop.gain > 0))
			return fail(source.path, 'the coefficients overflow when the blocks are multiplied');
	}
	return null;
}
