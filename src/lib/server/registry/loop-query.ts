/**
 * The loop list's filters and sorts as SQL, shared by the paged list, the per-verdict counts and
 * the CSV export so all three always mean the same rows. Everything is a bound parameter; the
 * only spliced text comes from the fixed tables below.
 */
import { VERDICTS, type Verdict } from '../../compliance/judge';
import { CRITERIA, type Criterion } from '../../compliance/criteria';
import { orderSql, SORT_KEYS, type LoopSort } from './loop-sort-keys';
import { Invalid } from '../errors';
import { isUuid } from './common';
import { LOOP_ARCHIVED, LOOP_DIRS, LOOP_SORTS } from '../../registry/loop-filters';

export { LOOP_SORTS, type LoopSort } from './loop-sort-keys';

export interface LoopFilters {
	q?: string;
	product?: string;
	class?: string;
	owner?: string;
	verdict?: Verdict;
	/** Loops whose latest judgement falls short on this criterion, covered by a deviation or not. */
	failing?: Criterion;
	tag?: string;
	/** Verdict changed, or a revision uploaded, at or after this moment. */
	changedSince?: Date;
	archived?: 'active' | 'archived' | 'all';
	sort?: LoopSort;
	dir?: 'asc' | 'desc';
}

// A date (midnight UTC) or a date-time with seconds optional and a zone (Z or ±hh:mm) optional.
const ISO =
	/^\d{4}-\d{2}-\d{2}(?:[T ]\d{2}:\d{2}(?::\d{2}(?:\.\d{1,9})?)?(?:Z|[+-]\d{2}:?\d{2})?)?$/;

function parseInstant(raw: string, name: string): Date {
	const value = /^\d{4}-\d{2}-\d{2}$/.test(raw) ? `${raw}T00:00:00Z` : raw.replace(' ', 'T');
	const date = new Date(value);
	if (!ISO.test(raw) || Number.isNaN(date.getTime())) {
		throw new Invalid(
			`${name} must be an ISO date (2026-12-01) or date-time (2026-12-01T08:00:00Z).`,
			name
		);
	}
	return date;
}

/** Filters from a query string; an unknown value is a 400 naming the parameter. */
export function loopFiltersFrom(params: URLSearchParams): LoopFilters {
	const text = (name: string) => params.get(name)?.trim() || undefined;
	const pick = <T extends string>(name: string, allowed: readonly T[]): T | undefined => {
		const v = text(name);
		if (v === undefined) return undefined;
		if (!(allowed as readonly string[]).includes(v))
			throw new Invalid(`${name} must be one of ${allowed.join(', ')}.`, name);
		return v as T;
	};
	const since = text('changedSince');
	return {
		q: text('q'),
		product: text('product'),
		class: text('class'),
		owner: text('owner'),
		verdict: pick('verdict', VERDICTS),
		failing: pick('failing', CRITERIA),
		tag: text('tag'),
		changedSince: since === undefined ? undefined : parseInstant(since, 'changedSince'),
		archived: pick('archived', LOOP_ARCHIVED),
		sort: pick('sort', LOOP_SORTS),
		dir: pick('dir', LOOP_DIRS)
	};
}

type Alias = 'p' | 'c' | 'u';
const JOIN_SQL: Record<Alias, string> = {
	p: 'join product p on p.id = l.product_id',
	c: 'join loop_class c on c.id = l.loop_class_id',
	u: 'join app_user u on u.id = l.owner_id'
};

/** The tables a loop row is listed, filtered and sorted with (aliases l, p, c, u). */
export const JOINS = Object.values(JOIN_SQL).join('\n\t');

/**
 * `from loop l` with only the joins the given aliases need (filters never need one; a sort on
 * product, class or owner does): every loop has exactly one product, class and owner (not-null
 * foreign keys), so leaving an unused join out changes no row, and the planner cannot drop an
 * inner join on its own.
 */
export const fromWith = (aliases: Iterable<Alias>) => `from loop l ${joinsOf(aliases)}`;

/** The joins of fromWith alone. */
export const joinsOf = (aliases: Iterable<Alias>) => {
	const need = new Set(aliases);
	return (Object.keys(JOIN_SQL) as Alias[])
		.filter((a) => need.has(a))
		.map((a) => JOIN_SQL[a])
		.join(' ');
};

const like = (q: string) => `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

/** `where …` and its parameters; `omit` leaves filters out (the counts per verdict ignore `verdict`). */
export function whereOf(
	f: LoopFilters,
	omit: (keyof LoopFilters)[] = []
): { sql: string; params: unknown[] } {
	const clauses: string[] = [];
	const params: unknown[] = [];
	const add = (sql: string, ...values: unknown[]) => {
		clauses.push(sql);
		params.push(...values);
	};
	const use = (k: keyof LoopFilters) => f[k] !== undefined && !omit.includes(k);
	if (use('q')) add('(l.key ilike ? or l.name ilike ?)', like(f.q!), like(f.q!));
	// A product, class or owner named by key or e-mail is looked up once (an InitPlan) and the
	// loops filtered on their own indexed column, with no join.
	if (use('product')) add('l.product_id = (select id from product where key = ?)', f.product);
	if (use('class')) add('l.loop_class_id = (select id from loop_class where key = ?)', f.class);
	if (use('owner')) {
		if (isUuid(f.owner!)) add('l.owner_id = ?', f.owner);
		else add('l.owner_id = (select id from app_user where email = ?)', f.owner!.toLowerCase());
	}
	if (use('verdict')) add('l.verdict = ?', f.verdict);
	if (use('failing')) add('l.failing_criteria @> array[?::text]', f.failing);
	if (use('tag')) add('l.tags @> array[?::text]', f.tag);
	if (use('changedSince')) {
		// last_revision_at is kept by a trigger on revision inserts; two indexed columns of loop.
		add('(l.verdict_changed_at >= ? or l.last_revision_at >= ?)', f.changedSince, f.changedSince);
	}
	const archived = omit.includes('archived') ? 'all' : (f.archived ?? 'active');
	if (archived !== 'all')
		add(archived === 'active' ? 'l.archived_at is null' : 'l.archived_at is not null');
	return { sql: clauses.length ? `where ${clauses.join(' and ')}` : '', params };
}

/** `order by …`: loops without a value (not computed, or unbounded) come last either way. */
export function orderOf(f: LoopFilters): { sql: string; joins: Alias[] } {
	const sort = f.sort ?? 'key';
	const join = SORT_KEYS[sort].join;
	return { sql: orderSql(sort, f.dir ?? 'asc'), joins: join ? [join] : [] };
}
