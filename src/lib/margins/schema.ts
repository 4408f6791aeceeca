/**
 * The zod schema of `headroom-loop-model/1`: structure here, the rules that need the whole model
 * (properness, conjugate roots, sampled delays, domains…) in checks.ts, attached as one refinement
 * so that every consumer of the schema refuses exactly what the engine refuses.
 */
import { z } from 'zod';
import {
	MAX_BLOCKS,
	MAX_CASES,
	MAX_MEASURED_POINTS,
	MAX_POLY_DEGREE,
	MAX_ROOTS,
	MAX_STATES
} from './limits';
import { checkModel } from './checks';

export const MODEL_FORMAT = 'headroom-loop-model/1' as const;

const describe = (input: unknown): string =>
	input === null ? 'null' : Array.isArray(input) ? 'an array' : typeof input;

/** JSON has no NaN, but 1e309 parses to Infinity: refuse it as plainly as a string. */
const finite = z.number({
	error: (iss) =>
		iss.input === undefined
			? 'is required'
			: typeof iss.input === 'number'
				? `is not a finite number (${String(iss.input)})`
				: `must be a number, got ${describe(iss.input)}`
});

const coefficients = z.array(finite).max(MAX_POLY_DEGREE + 1, {
	error: `has more than ${MAX_POLY_DEGREE + 1} coefficients (degree limit ${MAX_POLY_DEGREE})`
});

const root = z.union([finite, z.tuple([finite, finite])], {
	error: 'a root is a number or a pair [re, im]'
});
const roots = z.array(root).max(MAX_ROOTS, { error: `has more than ${MAX_ROOTS} roots` });

const matrix = (what: string) =>
	z
		.array(
			z.array(finite).max(MAX_STATES, { error: `row is longer than the state limit ${MAX_STATES}` })
		)
		.max(MAX_STATES, { error: `has more rows than the state limit ${MAX_STATES}` })
		.describe(what);

const discretisation = {
	domain: z.enum(['s', 'z'], { error: 'domain must be "s" or "z"' }).optional(),
	discretize: z
		.enum(['zoh', 'tustin'], { error: 'discretize must be "zoh" or "tustin"' })
		.optional()
};

const polynomialBlock = z.strictObject({
	type: z.literal('polynomial'),
	numerator: coefficients,
	denominator: coefficients,
	...discretisation
});

const factoredBlock = z.strictObject({
	type: z.literal('factored'),
	zeros: roots.optional(),
	poles: roots.optional(),
	gain: finite.optional(),
	...discretisation
});

const stateSpaceBlock = z.strictObject({
	type: z.literal('state-space'),
	a: matrix('a'),
	b: matrix('b'),
	c: matrix('c'),
	d: matrix('d').optional(),
	...discretisation
});

const pidBlock = z.strictObject({
	type: z.literal('pid'),
	kp: finite.optional(),
	ki: finite.optional(),
	kd: finite.optional(),
	derivativeFilterSeconds: finite.optional(),
	...discretisation
});

const series = z
	.array(finite)
	.min(2, { error: 'needs at least 2 points' })
	.max(MAX_MEASURED_POINTS, { error: `has more than ${MAX_MEASURED_POINTS} points` });

const measuredBlock = z.strictObject({
	type: z.literal('measured'),
	hz: series,
	magnitudeDb: series,
	phaseDeg: series,
	openLoopUnstablePoles: z
		.number({
			error: (iss) =>
				iss.input === undefined
					? 'is required: stability cannot be inferred from measured data alone'
					: 'must be a whole number ≥ 0'
		})
		.int({ error: 'must be a whole number ≥ 0' })
		.min(0, { error: 'must be a whole number ≥ 0' }),
	...discretisation
});

const BLOCK_TYPES = ['polynomial', 'factored', 'state-space', 'pid', 'measured'];

export const blockSchema = z.discriminatedUnion(
	'type',
	[polynomialBlock, factoredBlock, stateSpaceBlock, pidBlock, measuredBlock],
	{
		error: (iss) => {
			const type = (iss.input as { type?: unknown } | undefined)?.type;
			return type === undefined
				? `block type is required (one of ${BLOCK_TYPES.join(', ')})`
				: `unknown block type ${JSON.stringify(type)} (expected one of ${BLOCK_TYPES.join(', ')})`;
		}
	}
);

const blocks = z
	.array(blockSchema, {
		error: (iss) => (iss.input === undefined ? 'is required' : 'must be an array of blocks')
	})
	.min(1, { error: 'no blocks: a loop needs at least one block' })
	.max(MAX_BLOCKS, { error: `has more than ${MAX_BLOCKS} blocks` });

const positive = (what: string) => finite.refine((x) => x > 0, { error: `${what} must be > 0` });
const nonNegative = (what: string) =>
	finite.refine((x) => x >= 0, { error: `${what} must be ≥ 0 (a delay cannot be negative)` });

const caseSchema = z.strictObject({
	name: z
		.string({ error: 'a case needs a name' })
		.min(1, { error: 'a case name cannot be empty' })
		.max(200),
	gain: positive('gain').optional(),
	delaySeconds: nonNegative('delaySeconds').optional(),
	blocks: blocks.optional()
});

const baseSchema = z.strictObject({
	format: z.literal(MODEL_FORMAT, {
		error: (iss) =>
			iss.input === undefined
				? `format is required ("${MODEL_FORMAT}")`
				: `wrong format ${JSON.stringify(iss.input)}: expected "${MODEL_FORMAT}"`
	}),
	title: z.string().max(500).optional(),
	sampleTimeSeconds: positive('sampleTimeSeconds').optional(),
	delaySeconds: nonNegative('delaySeconds').optional(),
	blocks,
	cases: z
		.array(caseSchema)
		.min(1, { error: 'cases is empty: leave it out for the single case "nominal"' })
		.max(MAX_CASES, { error: `has more than ${MAX_CASES} cases` })
		.optional()
});

export const loopModelSchema = baseSchema.superRefine(checkModel, {
	when: (payload) => payload.issues.length === 0
});

export type LoopModel = z.output<typeof baseSchema>;
export type Block = z.output<typeof blockSchema>;
export type CaseSpec = NonNullable<LoopModel['cases']>[number];
export type PolynomialBlock = z.output<typeof polynomialBlock>;
export type FactoredBlock = z.output<typeof factoredBlock>;
export type StateSpaceBlock = z.output<typeof stateSpaceBlock>;
export type PidBlock = z.output<typeof pidBlock>;
export type MeasuredBlock = z.output<typeof measuredBlock>;
