/**
 * Differences between two model summaries (the engine's `summarizeModel`): continuous or
 * sampled, sample time, loop delay, order, operating cases and blocks, each as before/after text
 * and, when it changed, a short sentence.
 */
import type { ModelSummary } from '../margins/summary';
import { seconds } from './format';

export interface ModelChange {
	field: string;
	label: string;
	before: string;
	after: string;
	changed: boolean;
	/** "sample time changed from 62.5 µs to 125 µs"; null when unchanged. */
	sentence: string | null;
}

const kind = (s: ModelSummary) => (s.sampled ? 'sampled' : 'continuous');
const time = (v: number | null, none: string) => (v === null ? none : seconds(v));

/** The rows of one summary, in display order (also used to show a single revision's model). */
export function summaryRows(s: ModelSummary): { field: string; label: string; text: string }[] {
	return [
		{ field: 'kind', label: 'Kind', text: kind(s) },
		{
			field: 'sampleTime',
			label: 'Sample time',
			text: time(s.sampleTimeSeconds, '— (continuous)')
		},
		{ field: 'delay', label: 'Loop delay', text: time(s.delaySeconds, 'none') },
		{
			field: 'order',
			label: 'Order (nominal)',
			text: s.order === null ? '— (measured data)' : String(s.order)
		},
		{ field: 'cases', label: 'Operating cases', text: s.cases.join(', ') },
		...s.blocks.map((b, i) => ({ field: `block${i + 1}`, label: `Block ${i + 1}`, text: b }))
	];
}

function sentence(
	field: string,
	label: string,
	before: string | undefined,
	after: string | undefined,
	a: ModelSummary,
	b: ModelSummary
): string {
	const name = label.charAt(0).toLowerCase() + label.slice(1);
	if (field === 'kind') return `the loop became ${kind(b)} (was ${kind(a)})`;
	if (field === 'cases') {
		const added = b.cases.filter((c) => !a.cases.includes(c));
		const removed = a.cases.filter((c) => !b.cases.includes(c));
		const parts = [
			added.length && `added ${added.map((c) => `“${c}”`).join(', ')}`,
			removed.length && `removed ${removed.map((c) => `“${c}”`).join(', ')}`
		].filter(Boolean);
		return `operating cases ${parts.length ? parts.join('; ') : 'reordered'}`;
	}
	if (before === undefined) return `${name} added (${after})`;
	if (after === undefined) return `${name} removed (was ${before})`;
	return `${name} changed from ${before} to ${after}`;
}

/** Row by row; a block present on one side only counts as added or removed. Empty when either summary is missing. */
export function diffSummaries(a: ModelSummary | null, b: ModelSummary | null): ModelChange[] {
	if (!a || !b) return [];
	const ra = summaryRows(a);
	const rb = summaryRows(b);
	const fields = [...new Set([...ra.map((r) => r.field), ...rb.map((r) => r.field)])];
	// Blocks after the fixed rows, in number order, whichever side has more of them.
	fields.sort((x, y) => order(x) - order(y));
	const rows = fields.map((field) => {
		const x = ra.find((r) => r.field === field);
		const y = rb.find((r) => r.field === field);
		const label = (x ?? y)!.label;
		const changed = x?.text !== y?.text;
		return {
			field,
			label,
			before: x?.text ?? '—',
			after: y?.text ?? '—',
			changed,
			sentence: changed ? sentence(field, label, x?.text, y?.text, a, b) : null
		};
	});
	// "became sampled" already says the sample time appeared or went.
	if (a.sampled !== b.sampled)
		for (const r of rows) if (r.field === 'sampleTime') r.sentence = null;
	return rows;
}

const FIXED = ['kind', 'sampleTime', 'delay', 'order', 'cases'];
const order = (field: string) =>
	FIXED.includes(field) ? FIXED.indexOf(field) : FIXED.length + Number(field.slice(5));
