/**
 * Loop counts for the dashboard: per verdict, and per product and per class split by verdict.
 * Each count honours every other filter but its own dimension, which is what a click on it then
 * sets: the verdict counts ignore `verdict` (they are the verdicts within the current product,
 * class, owner … scope), the product rows ignore `product` and `verdict`, the class rows ignore
 * `class` and `verdict`. One GROUP BY each.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { VERDICTS, type Verdict } from '../../compliance/judge';
import { fromWith, whereOf, type LoopFilters } from './loop-query';
import { remembered } from '../db/registry-changes';

export type VerdictCounts = Record<Verdict, number>;

export interface GroupCount {
	key: string;
	name: string;
	total: number;
	verdicts: VerdictCounts;
}

export interface LoopSummary {
	/** Loops in scope (every filter but `verdict`). */
	total: number;
	verdicts: VerdictCounts;
	products: GroupCount[];
	classes: GroupCount[];
}

const zero = (): VerdictCounts => Object.fromEntries(VERDICTS.map((v) => [v, 0])) as VerdictCounts;

async function grouped(em: EntityManager, f: LoopFilters, dim: 'p' | 'c'): Promise<GroupCount[]> {
	const where = whereOf(f, [dim === 'p' ? 'product' : 'class', 'verdict']);
	const rows = await em
		.getConnection()
		.execute<{ key: string; name: string; verdict: Verdict; n: number }[]>(
			`select ${dim}.key, ${dim}.name, l.verdict, count(*)::int as n ${fromWith([dim])} ${where.sql}
		 group by ${dim}.key, ${dim}.name, l.verdict order by ${dim}.key`,
			where.params
		);
	const groups = new Map<string, GroupCount>();
	for (const r of rows) {
		const g = groups.get(r.key) ?? { key: r.key, name: r.name, total: 0, verdicts: zero() };
		g.verdicts[r.verdict] = r.n;
		g.total += r.n;
		groups.set(r.key, g);
	}
	return [...groups.values()];
}

/**
 * The counts for a filter (its `verdict` plays no part), remembered until the registry next
 * changes (db/registry-changes.ts). The value is shared between callers: never mutate it.
 */
export async function loopSummary(em: EntityManager, f: LoopFilters): Promise<LoopSummary> {
	const where = whereOf(f, ['verdict']);
	return remembered(em, `loops.summary ${where.sql} ${JSON.stringify(where.params)}`, () =>
		countSummary(em, f, where)
	);
}

async function countSummary(
	em: EntityManager,
	f: LoopFilters,
	where: { sql: string; params: unknown[] }
): Promise<LoopSummary> {
	const [rows, products, classes] = await Promise.all([
		em
			.getConnection()
			.execute<{ verdict: Verdict; n: number }[]>(
				`select l.verdict, count(*)::int as n from loop l ${where.sql} group by l.verdict`,
				where.params
			),
		grouped(em, f, 'p'),
		grouped(em, f, 'c')
	]);
	const verdicts = zero();
	for (const r of rows) verdicts[r.verdict] = r.n;
	return { total: rows.reduce((a, r) => a + r.n, 0), verdicts, products, classes };
}
