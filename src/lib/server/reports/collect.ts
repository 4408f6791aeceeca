/**
 * Gather what a report shows, frozen at render time: the loops the filters select (paged
 * through listLoops, the same query as the dashboard), each loop's latest judgement as stored on
 * its row (verdict, criteria, the judged revision and requirement version), the revision's
 * sha-256, and the requirement version in force per class.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Judgement } from '../../compliance/judge';
import type { Targets } from '../../compliance/criteria';
import { normalizeDecimal } from '../../registry/targets';
import { TARGET_KEYS } from '../db/entities/targets';
import { listLoops, loopFiltersFrom, type LoopView } from '../registry/loops';
import { filtersToQuery, type ReportFilters } from '../../reports/filters';
import type { FrozenRequirement, FrozenRevision, ReportLoop } from '../../reports/types';

const PAGE = 200;

/** Every loop the filters select, in the dashboard's order (product and key as tie-breaks). */
export async function selectLoops(em: EntityManager, filters: ReportFilters): Promise<LoopView[]> {
	const f = loopFiltersFrom(filtersToQuery(filters));
	const out: LoopView[] = [];
	for (let page = 1; ; page++) {
		const chunk = await listLoops(em, f, { page, pageSize: PAGE });
		out.push(...chunk.items);
		if (chunk.items.length < PAGE || out.length >= chunk.total) return out;
	}
}

const snake = (k: string) => k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
/** Threshold columns as exact text (numeric → string), named like the fields of Targets. */
const targetColumns = (alias: string) =>
	TARGET_KEYS.map((k) => `${alias}${snake(k)}::text as "${k}"`).join(', ');
/** Canonical decimals ("45.000000000" → "45"), unset targets left out. */
const cleanTargets = (t: Targets): Targets =>
	Object.fromEntries(
		TARGET_KEYS.map((k) => [k, normalizeDecimal(t[k])]).filter(([, v]) => v !== null)
	) as Targets;

interface JudgedRow {
	id: string;
	verdict_detail: Judgement | null;
	judged_revision_id: string | null;
	judged_requirement_id: string | null;
	judged_at: string | Date | null;
}

/** Lists go to SQL as JSON text (knex would splice a JS array into the value list). */
const idsIn = (column: string) => `${column} in (select jsonb_array_elements_text(?::jsonb)::uuid)`;

export async function collectLoops(
	em: EntityManager,
	filters: ReportFilters
): Promise<ReportLoop[]> {
	const loops = await selectLoops(em, filters);
	if (!loops.length) return [];
	const conn = em.getConnection();
	const judged = await conn.execute<JudgedRow[]>(
		`select id, verdict_detail, judged_revision_id, judged_requirement_id, judged_at from loop where ${idsIn('id')}`,
		[JSON.stringify(loops.map((l) => l.id))]
	);
	const byLoop = new Map(judged.map((j) => [j.id, j]));
	const revisionIds = [
		...new Set(judged.map((j) => j.judged_revision_id).filter((x): x is string => !!x))
	];
	const requirementIds = [
		...new Set(judged.map((j) => j.judged_requirement_id).filter((x): x is string => !!x))
	];
	const revisions = new Map<string, FrozenRevision>();
	if (revisionIds.length) {
		const rows = await conn.execute<
			{ id: string; number: number; sha256: string | null; object_key: string; file_name: string }[]
		>(`select id, number, sha256, object_key, file_name from revision where ${idsIn('id')}`, [
			JSON.stringify(revisionIds)
		]);
		for (const r of rows)
			revisions.set(r.id, {
				id: r.id,
				number: r.number,
				sha256: r.sha256,
				objectKey: r.object_key,
				fileName: r.file_name
			});
	}
	const versions = new Map<string, { version: number; targets: Targets }>();
	if (requirementIds.length) {
		const rows = await conn.execute<({ id: string; version: number } & Targets)[]>(
			`select id, version, ${targetColumns('')} from requirement where ${idsIn('id')}`,
			[JSON.stringify(requirementIds)]
		);
		for (const { id, version, ...targets } of rows)
			versions.set(id, { version, targets: cleanTargets(targets) });
	}
	return loops.map((l): ReportLoop => {
		const j = byLoop.get(l.id);
		const detail = j?.verdict_detail ?? null;
		const requirementId = j?.judged_requirement_id ?? null;
		return {
			id: l.id,
			key: l.key,
			name: l.name,
			product: { key: l.product.key, name: l.product.name },
			class: { key: l.class.key, name: l.class.name },
			owner: { name: l.owner.name, email: l.owner.email },
			tags: l.tags,
			verdict: l.verdict,
			judgedAt: j?.judged_at ? new Date(j.judged_at).toISOString() : null,
			requirement:
				requirementId && versions.has(requirementId)
					? { id: requirementId, ...versions.get(requirementId)! }
					: null,
			revision: j?.judged_revision_id ? (revisions.get(j.judged_revision_id) ?? null) : null,
			criteria: detail?.criteria ?? [],
			failing: detail?.failing ?? [],
			activeDeviations: l.activeDeviations
		};
	});
}

/** The requirement version in force (the highest) for each class among the loops. */
export async function requirementsInForce(
	em: EntityManager,
	loops: ReportLoop[]
): Promise<FrozenRequirement[]> {
	const classKeys = [...new Set(loops.map((l) => l.class.key))];
	if (!classKeys.length) return [];
	const columns = targetColumns('r.');
	const rows = await em
		.getConnection()
		.execute<({ id: string; version: number; class_key: string; class_name: string } & Targets)[]>(
			`select distinct on (c.id) r.id, r.version, c.key as class_key, c.name as class_name, ${columns}
		 from requirement r join loop_class c on c.id = r.loop_class_id
		 where c.key in (select jsonb_array_elements_text(?::jsonb))
		 order by c.id, r.version desc`,
			[JSON.stringify(classKeys)]
		);
	return rows
		.map(({ id, version, class_key, class_name, ...targets }) => ({
			classKey: class_key,
			className: class_name,
			requirementId: id,
			version,
			targets: cleanTargets(targets as Targets)
		}))
		.sort((a, b) => a.classKey.localeCompare(b.classKey));
}
