/**
 * The filters a compliance report is cut by: the same names and meanings as GET /api/loops (and
 * the dashboard's URL), so "export what I am looking at" is the dashboard's query string — its
 * filters, which loops by archive state, and its order (`sort`, `dir`); only the paging is left
 * out, since a report holds every loop the view selects. Pure: shared by the API, the reports
 * page (scope shown in words) and the render job.
 */
import { z } from 'zod';
import { CRITERIA, CRITERION_LABELS, type Criterion } from '../compliance/criteria';
import { VERDICTS, type Verdict } from '../compliance/judge';
import { VERDICT_LABELS } from '../compliance/labels';
import {
	LOOP_ARCHIVED,
	LOOP_DIRS,
	LOOP_SORTS,
	type LoopArchived,
	type LoopDir,
	type LoopSort
} from '../registry/loop-filters';

export const REPORT_FORMATS = ['pdf', 'csv'] as const;
export type ReportFormat = (typeof REPORT_FORMATS)[number];

export const REPORT_FILTER_NAMES = [
	'verdict',
	'product',
	'class',
	'owner',
	'failing',
	'tag',
	'q',
	'changedSince',
	'archived',
	'sort',
	'dir'
] as const;
export type ReportFilterName = (typeof REPORT_FILTER_NAMES)[number];

export interface ReportFilters {
	verdict?: Verdict;
	product?: string;
	class?: string;
	/** An owner's e-mail (or user id), as on /api/loops. */
	owner?: string;
	/** Loops whose latest judgement fails this criterion. */
	failing?: Criterion;
	tag?: string;
	/** Key or name contains this text. */
	q?: string;
	/** Loops whose verdict changed at or after this day or instant (ISO 8601). */
	changedSince?: string;
	/** Archived loops only, or all; absent: the loops not archived (`active`, dropped when parsed). */
	archived?: LoopArchived;
	/** The loops' order, as on the dashboard (absent: by loop key). */
	sort?: LoopSort;
	/** absent: ascending. */
	dir?: LoopDir;
}

const text = (max: number) =>
	z
		.string()
		.trim()
		.max(max, `At most ${max} characters.`)
		.transform((v) => v || undefined)
		.optional();

// As GET /api/loops reads it: a date (midnight UTC) or a date-time, seconds and zone optional.
const ISO =
	/^\d{4}-\d{2}-\d{2}(?:[T ]\d{2}:\d{2}(?::\d{2}(?:\.\d{1,9})?)?(?:Z|[+-]\d{2}:?\d{2})?)?$/;

const changedSince = z
	.string()
	.trim()
	.refine(
		(v) =>
			v === '' ||
			(ISO.test(v) &&
				!Number.isNaN(
					Date.parse(/^\d{4}-\d{2}-\d{2}$/.test(v) ? `${v}T00:00:00Z` : v.replace(' ', 'T'))
				)),
		{
			message: 'Give a date (2026-11-30) or an ISO 8601 date-time (2026-11-30T08:00:00Z).'
		}
	)
	.transform((v) => v || undefined)
	.optional();

/** One of `values`, '' meaning absent; a wrong value is refused with the list of right ones. */
const optionalEnum = <T extends readonly [string, ...string[]]>(
	values: T,
	what: string,
	absent: readonly string[] = []
) =>
	z
		.enum(['', ...values], { error: `${what} must be one of ${values.join(', ')}.` })
		.transform((v) => (v === '' || absent.includes(v) ? undefined : (v as T[number])))
		.optional();

/** Strict: an unknown filter name is refused (a typo would silently widen the report). */
export const reportFiltersSchema = z.strictObject({
	verdict: optionalEnum(VERDICTS, 'verdict'),
	product: text(64),
	class: text(64),
	owner: text(254),
	failing: optionalEnum(CRITERIA, 'failing'),
	tag: text(64),
	q: text(200),
	changedSince,
	// `active` is what no parameter means: dropped, so one view has one stored form
	archived: optionalEnum(LOOP_ARCHIVED, 'archived', ['active']),
	sort: optionalEnum(LOOP_SORTS, 'sort'),
	dir: optionalEnum(LOOP_DIRS, 'dir')
});

export const reportRequestSchema = z.strictObject({
	format: z.enum(REPORT_FORMATS, { error: 'format must be "pdf" or "csv".' }),
	filters: reportFiltersSchema.optional().default({})
});

/** Only the filters that are set, in a stable order (stored on the export, compared in tests). */
export function cleanFilters(f: ReportFilters): ReportFilters {
	const out: Record<string, string> = {};
	for (const name of REPORT_FILTER_NAMES) {
		const v = f[name];
		if (v !== undefined && v !== '') out[name] = v;
	}
	return out as ReportFilters;
}

/** The report filters a page URL carries (the dashboard links to /reports?<its query>). */
export function filtersFromQuery(params: URLSearchParams): ReportFilters {
	const raw: Record<string, string> = {};
	for (const name of REPORT_FILTER_NAMES) {
		const v = params.get(name);
		if (v !== null) raw[name] = v;
	}
	const parsed = reportFiltersSchema.safeParse(raw);
	// A stale or hand-edited link keeps what is valid and drops the rest; the form shows the result.
	if (parsed.success) return cleanFilters(parsed.data);
	const bad = new Set(parsed.error.issues.map((i) => String(i.path[0])));
	const kept = Object.fromEntries(Object.entries(raw).filter(([k]) => !bad.has(k)));
	return cleanFilters(reportFiltersSchema.parse(kept));
}

/** The same filters as a query string for /api/loops or /loops. */
export function filtersToQuery(f: ReportFilters): URLSearchParams {
	const params = new URLSearchParams();
	for (const [k, v] of Object.entries(cleanFilters(f))) params.set(k, v);
	return params;
}

/** The scope of a report in words: "Non-compliant loops of product tarn-s2, tagged axis-1". */
export function scopeInWords(f: ReportFilters): string {
	const c = cleanFilters(f);
	const archived = c.archived === 'archived' ? 'archived ' : '';
	const head = c.verdict
		? `${VERDICT_LABELS[c.verdict]} ${archived}loops`
		: `All ${c.archived ? archived : 'active '}loops`;
	const parts: string[] = [];
	if (c.product) parts.push(`of product ${c.product}`);
	if (c.class) parts.push(`of class ${c.class}`);
	if (c.owner) parts.push(`owned by ${c.owner}`);
	if (c.failing) parts.push(`failing ${CRITERION_LABELS[c.failing].toLowerCase()}`);
	if (c.tag) parts.push(`tagged ${c.tag}`);
	if (c.q) parts.push(`with “${c.q}” in key or name`);
	if (c.changedSince) parts.push(`whose verdict changed since ${c.changedSince.replace('T', ' ')}`);
	let scope = parts.length ? `${head} ${parts.join(', ')}` : head;
	if (c.archived === 'all') scope += ', archived ones included';
	return c.sort || c.dir ? `${scope}; ${orderInWords(c)}` : scope;
}

const SORT_WORDS: Record<LoopSort, string> = {
	key: 'loop key',
	name: 'name',
	product: 'product',
	class: 'class',
	owner: 'owner',
	verdict: 'verdict',
	updatedAt: 'last change',
	phaseMargin: 'phase margin',
	upperGainMargin: 'upper gain margin',
	delayMargin: 'delay margin',
	modulusMargin: 'modulus margin',
	shortfall: 'shortfall'
};

/** "sorted by phase margin, descending" (loops without the figure last either way). */
export function orderInWords(f: ReportFilters): string {
	return `sorted by ${SORT_WORDS[f.sort ?? 'key']}, ${f.dir === 'desc' ? 'descending' : 'ascending'}`;
}
