/**
 * The loop list: one page of loops filtered and sorted in PostgreSQL, as rows shaped into
 * objects (the dashboard, the export, the reports) or as JSON PostgreSQL renders (the API), with
 * the number of loops the filter matches, remembered between writes (db/registry-changes.ts).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { CriterionResult, Verdict } from '../../compliance/judge';
import { fromWith, JOINS, joinsOf, orderOf, whereOf, type LoopFilters } from './loop-query';
import { offsetOf, type PageOf, type Paging } from './common';
import { preparedRows } from '../db/prepared';
import { emOf, remembered, shareResult, type EmSource } from '../db/registry-changes';
import type { LoopView } from './loops';

/** A row of the loop list: the loop, its worst-case margins and every criterion it was judged on. */
export interface LoopListItem extends LoopView {
	/** Worst case over operating cases of the latest computed revision; null = none (or unbounded). */
	worstCase: {
		phaseMarginDeg: number | null;
		upperGainMarginDb: number | null;
		delayMarginS: number | null;
		modulusMargin: number | null;
	};
	/** Each target of the class against its actual value, with the shortfall (from the judgement). */
	criteria: CriterionResult[];
	/** Criteria short of their target, covered by a deviation or not. */
	failing: string[];
	/** The largest shortfall as a fraction of its target (0.1 = 10 % short); null when none. */
	worstShortfall: number | null;
	judgedAt: string | null;
	verdictChangedAt: string | null;
}

interface ListRow {
	id: string;
	key: string;
	name: string;
	tags: string[];
	note: string;
	verdict: Verdict;
	archived_at: string | null;
	created_at: string;
	updated_at: string;
	criteria: CriterionResult[] | null;
	judged_at: string | null;
	verdict_changed_at: string | null;
	wc_phase_margin_deg: number | null;
	wc_upper_gain_margin_db: number | null;
	wc_delay_margin_s: number | null;
	wc_modulus_margin: number | null;
	failing_criteria: string[];
	worst_shortfall: number | null;
	product_id: string;
	product_key: string;
	product_name: string;
	class_id: string;
	class_key: string;
	class_name: string;
	owner_id: string;
	owner_name: string;
	owner_email: string;
	total: string | number;
	active_deviations: number;
}

// Timestamps leave PostgreSQL as the API's ISO text (UTC, milliseconds), the criteria without the
// rest of the cached judgement: a page of 50 rows otherwise spends more time parsing dates and
// JSON it does not answer with than running the query.
const isoColumn = (column: string) =>
	`to_char(${column} at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') as ${column.slice(2)}`;
const LIST_COLUMNS = `l.id, l.key, l.name, l.tags, l.note, l.verdict, ${isoColumn('l.archived_at')}, ${isoColumn('l.created_at')}, ${isoColumn('l.updated_at')},
	l.verdict_detail->'criteria' as criteria, ${isoColumn('l.judged_at')}, ${isoColumn('l.verdict_changed_at')}, l.wc_phase_margin_deg, l.wc_upper_gain_margin_db,
	l.wc_delay_margin_s, l.wc_modulus_margin, l.failing_criteria, l.worst_shortfall,
	p.id as product_id, p.key as product_key, p.name as product_name,
	c.id as class_id, c.key as class_key, c.name as class_name,
	u.id as owner_id, u.name as owner_name, u.email as owner_email`;

function listItem(r: ListRow, activeDeviations: number): LoopListItem {
	return {
		id: r.id,
		key: r.key,
		name: r.name,
		product: { id: r.product_id, key: r.product_key, name: r.product_name },
		class: { id: r.class_id, key: r.class_key, name: r.class_name },
		owner: { id: r.owner_id, name: r.owner_name, email: r.owner_email },
		tags: r.tags,
		note: r.note,
		verdict: r.verdict,
		activeDeviations,
		archivedAt: r.archived_at,
		createdAt: r.created_at,
		updatedAt: r.updated_at,
		worstCase: {
			phaseMarginDeg: r.wc_phase_margin_deg,
			upperGainMarginDb: r.wc_upper_gain_margin_db,
			delayMarginS: r.wc_delay_margin_s,
			modulusMargin: r.wc_modulus_margin
		},
		criteria: r.criteria ?? [],
		failing: r.failing_criteria,
		worstShortfall: r.worst_shortfall,
		judgedAt: r.judged_at,
		verdictChangedAt: r.verdict_changed_at
	};
}

/**
 * When the deviations in force on the page's loops next change with no write (one starts or
 * expires), in ms since the epoch; null when none will.
 */
const NEXT_DEVIATION_CHANGE = `(select (extract(epoch from min(least(case when d.starts_at > now() then d.starts_at end,
	case when d.expires_at > now() then d.expires_at end))) * 1000)::float8
	from deviation d where d.loop_id in (select id from page) and d.revoked_at is null)`;

/** Deviations of loop l in force now. */
const ACTIVE_DEVIATIONS = `(select count(*)::int from deviation d where d.loop_id = l.id and d.revoked_at is null
	and d.starts_at <= now() and d.expires_at > now())`;

/**
 * A page of the list: `with page as (the ids)`, then `body(order, total, joins)` over the page's
 * loops (l) with `total` the count expression (or null when not asked for) and `joins` the
 * tables the order needs (p, c or u).
 */
function pageQuery(
	f: LoopFilters,
	limit: number,
	offset: number,
	withTotal: boolean,
	body: (order: string, total: string, joins: string) => string
): { sql: string; params: unknown[] } {
	const where = whereOf(f);
	const order = orderOf(f);
	// The page is chosen on narrow rows (ids) with a plain ORDER BY … LIMIT, which PostgreSQL
	// answers by walking the sort's index (loop-sort-keys.ts) or with a bounded top-N sort; the
	// wide columns (the criteria, the active deviations) are fetched for those rows only,
	// re-sorted by the same expressions. The total is an uncorrelated subquery, evaluated once: a
	// window count would force a full sort.
	const total = withTotal ? `(select count(*) from loop l ${where.sql})` : 'null::bigint';
	return {
		sql: `with page as (select l.id ${fromWith(order.joins)} ${where.sql} ${order.sql} limit ? offset ?)
		${body(order.sql, total, joinsOf(order.joins))}`,
		params: [...where.params, limit, offset, ...(withTotal ? where.params : [])]
	};
}

/** The SQL of one page of the list as rows (also run by bench:web under EXPLAIN). */
export const listQuery = (f: LoopFilters, limit: number, offset: number, withTotal = true) =>
	pageQuery(
		f,
		limit,
		offset,
		withTotal,
		(order, total) => `select ${LIST_COLUMNS}, ${total} as total,
		       ${ACTIVE_DEVIATIONS} as active_deviations
		from page join loop l on l.id = page.id ${JOINS}
		${order}`
	);

/**
 * One row: the page's items as JSON text (in list order) and, if asked, the total. Each item is
 * the loop's stored `list_item` (kept by triggers, migration 20261202190000) with the deviations
 * in force now put in front: the API answers with this text as it comes, with no JSON built per
 * row and no row objects to parse, build and serialise again. list-json.test.ts holds it equal
 * to listItem's output.
 */
export const listJsonQuery = (f: LoopFilters, limit: number, offset: number, withTotal = true) =>
	pageQuery(
		f,
		limit,
		offset,
		withTotal,
		(
			order,
			total,
			joins
		) => `select coalesce('[' || string_agg('{"activeDeviations":' || ${ACTIVE_DEVIATIONS} || ',' || substr(l.list_item, 2), ',' ${order}) || ']', '[]') as items,
		       ${total} as total, ${NEXT_DEVIATION_CHANGE} as until
		from page join loop l on l.id = page.id ${joins}`
	);

async function pageRows(
	em: EntityManager,
	f: LoopFilters,
	limit: number,
	offset: number,
	withTotal = true
) {
	const q = listQuery(f, limit, offset, withTotal);
	const rows = await preparedRows<ListRow>(em, q.sql, q.params);
	return { rows, items: rows.map((r) => listItem(r, r.active_deviations)) };
}

/** Rows of the list in order (the export pages through them). */
export async function queryLoops(
	em: EntityManager,
	f: LoopFilters,
	limit: number,
	offset: number
): Promise<LoopListItem[]> {
	return (await pageRows(em, f, limit, offset)).items;
}

export async function countLoops(em: EntityManager, f: LoopFilters): Promise<number> {
	const where = whereOf(f);
	const [{ n }] = await preparedRows<{ n: number }>(
		em,
		`select count(*)::int as n from loop l ${where.sql}`,
		where.params
	);
	return n;
}

/** The key a filter's total is remembered under (registry-changes.ts): its SQL and values. */
const totalKey = (f: LoopFilters) => {
	const where = whereOf(f);
	return `loops.total ${where.sql} ${JSON.stringify(where.params)}`;
};

/**
 * A page and the number of loops its filter matches. The number is remembered until the
 * registry next changes (the web server listens for that), so paging through a filter, or many
 * people on one view, count its loops once; requests that arrive together after a change count
 * it once between them. `read(withTotal)` fetches the page, and the total with it when asked
 * (undefined when its rows cannot carry it).
 */
async function withTotal<T>(
	em: EntityManager,
	f: LoopFilters,
	read: (withTotal: boolean) => Promise<{ page: T; total: number | undefined }>
): Promise<{ page: T; total: number }> {
	const share = shareResult<number>(em, totalKey(f));
	let total: number | undefined;
	try {
		const counted = share.known === undefined && !share.wait;
		const result = await read(counted);
		total = counted ? result.total : (share.known ?? (await share.wait));
		// A page past the end has no row to carry the total, another request's count may have
		// failed, and a remembered one may predate a change notified while the page was read:
		// count then.
		if (total === undefined || !share.current()) total = await countLoops(em, f);
		return { page: result.page, total };
	} finally {
		share.lead?.(total);
	}
}

/** One page of the list, filtered and sorted in PostgreSQL, with the number of matching loops. */
export async function listLoops(
	em: EntityManager,
	f: LoopFilters,
	paging: Paging
): Promise<PageOf<LoopListItem>> {
	const offset = offsetOf(paging);
	const { page, total } = await withTotal(em, f, async (counted) => {
		const { rows, items } = await pageRows(em, f, paging.pageSize, offset, counted);
		return {
			page: items,
			total: rows.length ? Number(rows[0].total) : offset ? undefined : 0
		};
	});
	return { items: page, total, ...paging };
}

/** A page as JSON text, and when the deviations it counts next change (ms since the epoch). */
async function pageJson(
	em: EntityManager,
	f: LoopFilters,
	paging: Paging
): Promise<{ text: string; until: number | undefined }> {
	const { page, total } = await withTotal(em, f, async (counted) => {
		const q = listJsonQuery(f, paging.pageSize, offsetOf(paging), counted);
		const [row] = await preparedRows<{ items: string; total: string | null; until: number | null }>(
			em,
			q.sql,
			q.params
		);
		return {
			page: { items: row.items, until: row.until ?? undefined },
			total: row.total === null ? undefined : Number(row.total)
		};
	});
	return {
		text: `{"items":${page.items},"total":${total},"page":${paging.page},"pageSize":${paging.pageSize}}`,
		until: page.until
	};
}

/**
 * The same page as listLoops, as the JSON text of its PageOf (what GET /api/loops answers),
 * from the loops' stored items (listJsonQuery).
 */
export const listLoopsJson = async (em: EntityManager, f: LoopFilters, paging: Paging) =>
	(await pageJson(em, f, paging)).text;

const UTF8 = new TextEncoder();

/**
 * GET /api/loops's body: listLoopsJson as UTF-8, kept in memory until the registry next changes
 * (db/registry-changes.ts) or a deviation on the page starts or expires. The page does not
 * depend on who asks: every role reads every loop.
 */
export async function listLoopsBody(
	em: EmSource,
	f: LoopFilters,
	paging: Paging
): Promise<Uint8Array<ArrayBuffer>> {
	const where = whereOf(f);
	const key = `loops.page ${where.sql} ${JSON.stringify(where.params)} ${orderOf(f).sql} ${paging.pageSize} ${paging.page}`;
	let until: number | undefined;
	return remembered(
		em,
		key,
		async () => {
			const page = await pageJson(await emOf(em), f, paging);
			until = page.until;
			return UTF8.encode(page.text);
		},
		() => until
	);
}
