/**
 * Input rules for the registry, shared by the JSON API, the services and the page forms
 * (superforms validates with the same schemas in the browser and on the server). Thresholds
 * stay text so the value a lead typed is the value stored: no float ever sits in between.
 */
import { z } from 'zod';
import Decimal from 'decimal.js';
import { CRITERIA } from '../compliance/criteria';
import { THRESHOLD_INTEGER_DIGITS, THRESHOLD_SCALE } from './limits';

export const KEY_PATTERN = /^[a-z0-9][a-z0-9._-]*$/;

export const keyText = (what: string) =>
	z
		.string()
		.trim()
		.min(1, `Enter a ${what} key.`)
		.max(64, 'At most 64 characters.')
		.regex(KEY_PATTERN, 'Lower-case letters, digits, ".", "_" and "-", starting with a letter or digit.');

export const nameText = z.string().trim().min(1, 'Enter a name.').max(200, 'At most 200 characters.');

const DECIMAL = /^(\d+)(?:\.(\d+))?$/;

/** A positive threshold as typed ("45", "0.5"), or "" for no target. */
export const thresholdText = z
	.string()
	.trim()
	.superRefine((value, ctx) => {
		if (value === '') return;
		const m = DECIMAL.exec(value);
		if (!m) {
			ctx.addIssue({ code: 'custom', message: 'Enter a number with an optional decimal point, such as 45 or 0.5.' });
		} else if ((m[2]?.length ?? 0) > THRESHOLD_SCALE) {
			ctx.addIssue({ code: 'custom', message: `At most ${THRESHOLD_SCALE} decimal places are stored exactly.` });
		} else if (m[1].replace(/^0+(?=\d)/, '').length > THRESHOLD_INTEGER_DIGITS) {
			ctx.addIssue({ code: 'custom', message: 'That number is too large.' });
		} else if (/^[0.]+$/.test(value)) {
			ctx.addIssue({ code: 'custom', message: 'Must be greater than 0.' });
		}
	});

const peakText = thresholdText.refine((v) => v === '' || !DECIMAL.test(v) || new Decimal(v).gte(1), {
	message: 'Peak sensitivity is at least 1 (it is 1 / modulus margin).'
});

export const targetsObject = z.object({
	minUpperGainMarginDb: thresholdText.default(''),
	minLowerGainMarginDb: thresholdText.default(''),
	minPhaseMarginDeg: thresholdText.default(''),
	minDelayMarginSeconds: thresholdText.default(''),
	minDelayMarginSamples: thresholdText.default(''),
	minModulusMargin: thresholdText.default(''),
	maxPeakSensitivity: peakText.default(''),
	minDiskGainMarginDb: thresholdText.default(''),
	crossoverMinHz: thresholdText.default(''),
	crossoverMaxHz: thresholdText.default('')
});

function bandInOrder(v: { crossoverMinHz: string; crossoverMaxHz: string }): boolean {
	if (!v.crossoverMinHz || !v.crossoverMaxHz) return true;
	if (!DECIMAL.test(v.crossoverMinHz) || !DECIMAL.test(v.crossoverMaxHz)) return true; // reported per field
	return new Decimal(v.crossoverMaxHz).gt(v.crossoverMinHz);
}

export const reasonText = z
	.string()
	.trim()
	.min(1, 'Give a reason: it is kept in the history and the audit trail.')
	.max(2000, 'At most 2000 characters.');

/** A new requirement version: the full set of targets (blank = no target) and why. */
export const requirementSchema = targetsObject
	.extend({ reason: reasonText })
	.refine(bandInOrder, { message: 'The highest crossover must be above the lowest.', path: ['crossoverMaxHz'] });
export type RequirementInput = z.infer<typeof requirementSchema>;

export const productSchema = z.object({ key: keyText('product'), name: nameText });
export type ProductInput = z.infer<typeof productSchema>;

export const classSchema = z.object({
	key: keyText('class'),
	name: nameText,
	description: z.string().trim().max(4000, 'At most 4000 characters.').default(''),
	/** A user's id or e-mail; blank = no lead named. */
	lead: z.string().trim().max(320).default(''),
	openUploads: z.boolean().default(false)
});
export type ClassInput = z.infer<typeof classSchema>;
export const classUpdateSchema = classSchema.omit({ key: true });

export const TAG = /^[\p{L}\p{N}][\p{L}\p{N} ._/+-]{0,39}$/u;
export const tagList = z
	.array(z.string().trim().regex(TAG, 'Tags are up to 40 letters, digits, spaces or . _ / + -.'))
	.max(20, 'At most 20 tags.')
	.default([]);

export const loopSchema = z.object({
	product: keyText('product'),
	class: keyText('class'),
	key: keyText('loop'),
	name: nameText,
	/** A user's id or e-mail; blank = the signed-in user. */
	owner: z.string().trim().max(320).default(''),
	tags: tagList,
	note: z.string().trim().max(4000, 'At most 4000 characters.').default('')
});
export type LoopInput = z.infer<typeof loopSchema>;

// Spelled out rather than loopSchema.partial(): zod 4 would still fill the defaults in, and a
// patch must leave what it does not name untouched.
export const loopPatchSchema = z
	.object({
		product: keyText('product').optional(),
		class: keyText('class').optional(),
		key: keyText('loop').optional(),
		name: nameText.optional(),
		owner: z.string().trim().min(1, 'Name the new owner.').max(320).optional(),
		tags: tagList.optional(),
		note: z.string().trim().max(4000, 'At most 4000 characters.').optional(),
		archived: z.boolean().optional()
	})
	.strict();
export type LoopPatch = z.infer<typeof loopPatchSchema>;

export const isoInstant = z
	.string()
	.trim()
	.refine((v) => /^\d{4}-\d{2}-\d{2}([T ][\d:.]+(Z|[+-]\d{2}:?\d{2})?)?$/.test(v) && !Number.isNaN(Date.parse(v)), {
		message: 'Use an ISO date such as 2027-03-31 or 2027-03-31T12:00:00Z.'
	});

export const deviationSchema = z.object({
	criteria: z.array(z.enum(CRITERIA)).min(1, 'Name at least one criterion to relax.'),
	/** Relaxed values by target field; a listed criterion without a value is waived. */
	relaxed: z.record(z.string(), z.string().nullable()).default({}),
	reason: reasonText,
	startsAt: isoInstant.optional(),
	expiresAt: isoInstant
});
export type DeviationInput = z.infer<typeof deviationSchema>;

/** The page forms type tags as one line ("axis-1, rig-b"); the services take a list. */
export const tagsText = z.string().trim().max(1000, 'At most 1000 characters.').default('');
export const splitTags = (text: string) =>
	text
		.split(/[,;]/)
		.map((t) => t.trim())
		.filter(Boolean);

export const loopFormSchema = loopSchema.extend({ tags: tagsText });
export type LoopForm = z.infer<typeof loopFormSchema>;

/** Editing a loop on its page: every field present, prefilled; only changes are sent on. */
export const loopEditSchema = loopSchema.extend({ tags: tagsText, owner: z.string().trim().min(1, 'Choose an owner.') });

const DAY = /^\d{4}-\d{2}-\d{2}$/;
/** Granting a deviation from the loop page: one value input and one "waive" box per field. */
export const deviationFormSchema = targetsObject.extend({
	criteria: z.array(z.enum(CRITERIA)).min(1, 'Tick at least one criterion to relax.').default([]),
	waived: z.array(z.enum(CRITERIA)).default([]),
	reason: reasonText,
	startsOn: z.string().trim().refine((v) => v === '' || DAY.test(v), 'Use a date such as 2027-01-31.').default(''),
	expiresOn: z.string().trim().regex(DAY, 'Choose the expiry date.')
});
export type DeviationForm = z.infer<typeof deviationFormSchema>;
