/**
 * How report numbers and criteria read, shared by the PDF and the reports page. Pure. Only
 * characters the embedded Latin subset of IBM Plex has (no ≥ or ∞: "min", "max", "no limit").
 */
import {
	CRITERION_LABELS,
	CRITERION_UNITS,
	TARGET_FIELDS,
	CRITERIA,
	type Targets
} from '../compliance/criteria';
import type { CriterionResult } from '../compliance/judge';

/** A figure with four significant digits, minus as U+2212, no exponent for everyday sizes. */
export function figure(n: number | null | undefined): string {
	if (n === null || n === undefined || !Number.isFinite(n)) return '—';
	const abs = Math.abs(n);
	const text =
		abs !== 0 && (abs < 1e-3 || abs >= 1e6) ? n.toExponential(3) : String(Number(n.toPrecision(4)));
	return text.replace(/^-/, '−');
}

const unitAfter = (u: string) => (u === '°' ? '°' : u ? ` ${u}` : '');

/** "min 45°", "max 2", "20–300 Hz", "from 20 Hz". */
export function requiredText(
	c: Pick<CriterionResult, 'criterion' | 'comparison' | 'required'>
): string {
	const unit = unitAfter(CRITERION_UNITS[c.criterion]);
	if (c.comparison === 'within') {
		const [lo, hi] = c.required.split('–');
		return hi === '∞' ? `from ${lo} Hz` : `${lo}–${hi} Hz`;
	}
	return `${c.comparison === 'at most' ? 'max' : 'min'} ${c.required}${unit}`;
}

/** The actual value, or why there is none ("unbounded", "closed loop unstable"). */
export function actualText(c: Pick<CriterionResult, 'criterion' | 'actual' | 'note'>): string {
	if (c.actual === null) return c.note ?? '—';
	return `${figure(c.actual)}${unitAfter(CRITERION_UNITS[c.criterion])}`;
}

export function shortfallText(c: Pick<CriterionResult, 'criterion' | 'shortfall'>): string {
	return c.shortfall === null ? '' : `${c.shortfall}${unitAfter(CRITERION_UNITS[c.criterion])}`;
}

export const STATUS_WORDS: Record<CriterionResult['status'], string> = {
	pass: 'pass',
	fail: 'fail',
	covered: 'covered',
	'not-applicable': 'n/a'
};

/** A requirement version's targets in words: "phase margin min 45°; upper gain margin min 6 dB". */
export function targetsInWords(t: Targets): string {
	const parts: string[] = [];
	for (const criterion of CRITERIA) {
		const [a, b] = TARGET_FIELDS[criterion].map((f) => t[f] ?? null);
		const label = CRITERION_LABELS[criterion].toLowerCase();
		if (criterion === 'crossoverBand') {
			if (a || b) parts.push(`${label} ${a ?? '0'}–${b ?? 'no limit'} Hz`);
			continue;
		}
		if (!a) continue;
		const unit = unitAfter(CRITERION_UNITS[criterion]);
		parts.push(`${label} ${criterion === 'peakSensitivity' ? 'max' : 'min'} ${a}${unit}`);
	}
	return parts.length ? parts.join('; ') : 'no targets set';
}

/** Replace what the embedded font cannot draw (text from people can hold anything). */
export function pdfSafe(text: string): string {
	return text
		.replace(/≥/g, '>=')
		.replace(/≤/g, '<=')
		.replace(/∞/g, 'no limit')
		.replace(/→/g, '->')
		.split('')
		.filter((c) => c === '\n' || (c >= ' ' && c !== '\u007f'))
		.join('');
}
