/**
 * The loop list's sort keys as SQL, and the partial indexes that let PostgreSQL answer a sorted
 * page by walking an index instead of sorting every matching loop (bench:web: a page deep in
 * 10,000 loops fell from about 7 ms of sorting to 0.5 ms).
 *
 * A page is ordered by the key, then `l.key`, then `l.id`, nulls last in both directions; each
 * sort on a column of `loop` has one index per direction with exactly that order, restricted to
 * the loops lists show by default (not archived). Sorts on another table (product, class,
 * owner) join it and sort.
 *
 * Shared by the query builder and the entity's index list; the migrations that created the
 * indexes hold their SQL as text (migrations never change with the code): …140000_activity,
 * then …200000_sort_include with the INCLUDE columns.
 */
import { VERDICT_RANK } from '../../compliance/judge';
import type { LoopSort } from '../../registry/loop-filters';

export { LOOP_SORTS, type LoopSort } from '../../registry/loop-filters';

const rankCase = (alias: string) =>
	`case ${alias}verdict ${Object.entries(VERDICT_RANK)
		.map(([v, r]) => `when '${v}' then ${r}`)
		.join(' ')} end`;

/**
 * Sort expressions. A sort on a loop column takes the loop's alias (`l.` in queries, none in
 * index definitions); one on another table names the join it needs. Margins are worst case over
 * operating cases; a phase margin sorts by its size; verdicts best to worst (compliant …
 * unstable), so `desc` puts what needs attention first.
 */
export const SORT_KEYS: Record<LoopSort, { of: (loop: string) => string; join?: 'p' | 'c' | 'u' }> =
	{
		key: { of: (l) => `${l}key` },
		name: { of: (l) => `${l}name` },
		product: { of: () => 'p.key', join: 'p' },
		class: { of: () => 'c.key', join: 'c' },
		owner: { of: () => 'u.name', join: 'u' },
		verdict: { of: (l) => `(${rankCase(l)})` },
		updatedAt: { of: (l) => `${l}updated_at` },
		phaseMargin: { of: (l) => `abs(${l}wc_phase_margin_deg)` },
		upperGainMargin: { of: (l) => `${l}wc_upper_gain_margin_db` },
		delayMargin: { of: (l) => `${l}wc_delay_margin_s` },
		modulusMargin: { of: (l) => `${l}wc_modulus_margin` },
		shortfall: { of: (l) => `${l}worst_shortfall` }
	};

/** The page order for a sort and direction (tie-breakers: loop key, then id). */
export const orderSql = (sort: LoopSort, dir: 'asc' | 'desc') =>
	`order by ${SORT_KEYS[sort].of('l.')} ${dir} nulls last, l.key asc, l.id asc`;

const snake = (s: string) => s.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

/**
 * Columns every sort index carries besides its key: what the list's filters other than text and
 * tags test, and the columns under the sort expressions. A filtered page is then an index-only
 * walk (no loop row is read to test a filter, only the page's own rows are), and deep pages of a
 * filter cost index entries, not rows (bench:web: offset 200 of one class and verdict, 1.6 ms
 * → 0.19 ms).
 */
export const SORT_INDEX_INCLUDE = [
	'loop_class_id',
	'product_id',
	'owner_id',
	'verdict',
	'failing_criteria',
	'verdict_changed_at',
	'last_revision_at',
	'wc_phase_margin_deg'
];
const includeSql = SORT_INDEX_INCLUDE.map((c) => `"${c}"`).join(', ');

/** One partial index per (sort on a loop column, direction): name and `create index` SQL. */
export const SORT_INDEXES: { name: string; sql: string }[] = (
	Object.entries(SORT_KEYS) as [LoopSort, (typeof SORT_KEYS)[LoopSort]][]
)
	.filter(([, k]) => !k.join)
	.flatMap(([sort, k]) =>
		(['asc', 'desc'] as const).map((dir) => {
			const name = `loop_sort_${snake(sort)}_${dir}`;
			return {
				name,
				sql: `create index "${name}" on "loop" (${k.of('')} ${dir} nulls last, "key", "id") include (${includeSql}) where "archived_at" is null`
			};
		})
	);
