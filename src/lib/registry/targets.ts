/**
 * Threshold fields of a requirement version or a deviation, shared by the server, the forms and
 * the compare view. Pure (no SvelteKit, no database) so the browser can use it too. Values are
 * decimal strings end to end; decimal.js normalises and compares them, never binary floats.
 */
import Decimal from 'decimal.js';
import {
	CRITERIA,
	CRITERION_LABELS,
	TARGET_FIELDS,
	type Criterion,
	type Targets
} from '../compliance/criteria';

export type TargetKey = keyof Targets;

/** Every threshold field, in the order of the criteria (so forms and tables read alike). */
export const TARGET_KEYS: TargetKey[] = CRITERIA.flatMap((c) => TARGET_FIELDS[c]);

/** The criterion a threshold field belongs to. */
export const CRITERION_OF = Object.fromEntries(
	CRITERIA.flatMap((c) => TARGET_FIELDS[c].map((f) => [f, c]))
) as Record<TargetKey, Criterion>;

export interface FieldInfo {
	label: string;
	unit: string;
	/** Which way "stricter" goes: a larger minimum, a smaller maximum. */
	kind: 'min' | 'max';
	hint: string;
}

export const FIELD_INFO: Record<TargetKey, FieldInfo> = {
	minUpperGainMarginDb: { label: 'Minimum upper gain margin', unit: 'dB', kind: 'min', hint: 'How far the loop gain may rise before instability, e.g. 6.' },
	minLowerGainMarginDb: { label: 'Minimum lower gain margin', unit: 'dB', kind: 'min', hint: 'As a magnitude: how far the gain may fall (conditionally stable loops), e.g. 6.' },
	minPhaseMarginDeg: { label: 'Minimum phase margin', unit: '°', kind: 'min', hint: 'e.g. 45.' },
	minDelayMarginSeconds: { label: 'Minimum delay margin', unit: 's', kind: 'min', hint: 'Extra transport delay the loop tolerates, e.g. 0.0001.' },
	minDelayMarginSamples: { label: 'Minimum delay margin', unit: 'samples', kind: 'min', hint: 'Sampled loops only, e.g. 1.5.' },
	minModulusMargin: { label: 'Minimum modulus margin', unit: '', kind: 'min', hint: 'Smallest distance of the Nyquist curve to −1, e.g. 0.5.' },
	maxPeakSensitivity: { label: 'Maximum peak sensitivity Ms', unit: '', kind: 'max', hint: 'At least 1; Ms = 1 / modulus margin, e.g. 2.' },
	minDiskGainMarginDb: { label: 'Minimum disk gain margin', unit: 'dB', kind: 'min', hint: 'Balanced disk margin, optional, e.g. 4.' },
	crossoverMinHz: { label: 'Crossover band, lowest', unit: 'Hz', kind: 'min', hint: 'Every gain crossover at or above this frequency.' },
	crossoverMaxHz: { label: 'Crossover band, highest', unit: 'Hz', kind: 'max', hint: 'Every gain crossover at or below this frequency.' }
};

export { CRITERIA, CRITERION_LABELS, TARGET_FIELDS, type Criterion, type Targets };

/** A field's label with its unit, for tables and error messages. */
export function fieldLabel(key: TargetKey): string {
	const { label, unit } = FIELD_INFO[key];
	return unit ? `${label} (${unit})` : label;
}

/** Canonical text of a stored threshold: "45.000000000" → "45". */
export function normalizeDecimal(value: string | null | undefined): string | null {
	if (value === null || value === undefined || value === '') return null;
	return new Decimal(value).toFixed();
}

/** All ten fields, each a canonical decimal string or null. */
export function fullTargets(source: Partial<Record<TargetKey, string | null | undefined>>): Required<Targets> {
	return Object.fromEntries(TARGET_KEYS.map((k) => [k, normalizeDecimal(source[k])])) as Required<Targets>;
}

export function sameTargets(a: Targets, b: Targets): boolean {
	const fa = fullTargets(a);
	const fb = fullTargets(b);
	return TARGET_KEYS.every((k) => (fa[k] === null ? fb[k] === null : fb[k] !== null && new Decimal(fa[k]!).eq(fb[k]!)));
}

export interface TargetChange {
	key: TargetKey;
	label: string;
	a: string | null;
	b: string | null;
	changed: boolean;
	/** 'stricter' / 'looser' from a to b, 'added' / 'removed' for a target appearing or dropped. */
	direction: 'stricter' | 'looser' | 'added' | 'removed' | null;
}

/** Field-by-field comparison of two target sets (a = older, b = newer). */
export function compareTargets(a: Targets, b: Targets): TargetChange[] {
	const fa = fullTargets(a);
	const fb = fullTargets(b);
	return TARGET_KEYS.map((key) => {
		const [va, vb] = [fa[key], fb[key]];
		let direction: TargetChange['direction'] = null;
		if (va === null && vb !== null) direction = 'added';
		else if (va !== null && vb === null) direction = 'removed';
		else if (va !== null && vb !== null && !new Decimal(va).eq(vb)) {
			const up = new Decimal(vb).gt(va);
			direction = up === (FIELD_INFO[key].kind === 'min') ? 'stricter' : 'looser';
		}
		return { key, label: fieldLabel(key), a: va, b: vb, changed: direction !== null, direction };
	});
}

/** True when `relaxed` asks less of a loop than `required` does for that field. */
export function isLooser(key: TargetKey, relaxed: string, required: string): boolean {
	const r = new Decimal(relaxed);
	return FIELD_INFO[key].kind === 'min' ? r.lt(required) : r.gt(required);
}

/**
 * JSON clients may send thresholds as numbers and "no target" as null; the schemas want text.
 * A JSON number is converted through its shortest decimal form (what the client wrote for any
 * value of up to 15 significant digits), so 0.1 arrives as "0.1", never 0.1000000000000000055.
 */
export function thresholdsFromJson(input: unknown, keys: readonly string[] = TARGET_KEYS): unknown {
	if (!input || typeof input !== 'object' || Array.isArray(input)) return input;
	const out: Record<string, unknown> = { ...(input as Record<string, unknown>) };
	for (const k of keys) {
		const v = out[k];
		if (v === null) out[k] = '';
		else if (typeof v === 'number' && Number.isFinite(v)) out[k] = new Decimal(v).toFixed();
	}
	return out;
}
