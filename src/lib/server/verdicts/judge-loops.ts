/**
 * Judge loops again: the set-based core behind every re-judgement (a computed revision, a new
 * target version for a whole class, a deviation granted, revoked or expired). It reads what the
 * verdict depends on for a batch of loops in a few queries, applies the pure rules of
 * src/lib/compliance, and writes changed verdicts back with one UPDATE and one INSERT per batch.
 * Must run inside the caller's transaction (pass the transactional EntityManager).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { judge, type DeviationInput, type Judgement, type RevisionState } from '../../compliance/judge';
import { TARGET_FIELDS, type Criterion, type Targets } from '../../compliance/criteria';
import { shortCriteria, worstShortfall } from '../../compliance/shortfall';
import type { MarginsResult, WorstCase } from '../../margins/types';
import { TARGET_KEYS } from '../db/entities/targets';
import { VERDICT_RANK } from '../db/entities/verdict-event';
import type { Verdict } from '../../compliance/judge';

export const BATCH = 1000;

export type JudgeCause = 'revision' | 'requirement' | 'deviation' | 'expiry' | 'reconcile';

export interface VerdictChange {
	loopId: string;
	eventId: string;
	from: Verdict;
	to: Verdict;
	worse: boolean;
}

interface LoopRow {
	id: string;
	class_id: string;
	verdict: Verdict;
	revision_id: string | null;
	result: MarginsResult | null;
	has_pending: boolean;
	has_rejected: boolean;
}

const snake = (k: string) => k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
const list = (n: number) => Array.from({ length: n }, () => '?').join(', ');

async function loadLoops(em: EntityManager, ids: string[]): Promise<LoopRow[]> {
	return em.getConnection().execute<LoopRow[]>(
		`select l.id, l.loop_class_id as class_id, l.verdict, c.id as revision_id, mr.result,
		        exists (select 1 from revision p where p.loop_id = l.id and p.state in ('queued', 'computing')) as has_pending,
		        exists (select 1 from revision x where x.loop_id = l.id and x.state = 'rejected') as has_rejected
		 from loop l
		 left join lateral (
		   select r.id from revision r where r.loop_id = l.id and r.state = 'computed'
		   order by r.number desc limit 1) c on true
		 left join margin_report mr on mr.revision_id = c.id
		 where l.id in (${list(ids.length)})`,
		ids,
		'all',
		em.getTransactionContext()
	);
}

async function loadTargets(em: EntityManager, classIds: string[]) {
	const columns = TARGET_KEYS.map((k) => `${snake(k)}::text as "${k}"`).join(', ');
	const rows = await em.getConnection().execute<({ id: string; class_id: string } & Targets)[]>(
		`select distinct on (loop_class_id) id, loop_class_id as class_id, ${columns}
		 from requirement where loop_class_id in (${list(classIds.length)})
		 order by loop_class_id, version desc`,
		classIds,
		'all',
		em.getTransactionContext()
	);
	return new Map(rows.map(({ id, class_id, ...targets }) => [class_id, { id, targets: targets as Targets }]));
}

async function loadDeviations(em: EntityManager, loopIds: string[], now: Date) {
	const columns = TARGET_KEYS.map((k) => `${snake(k)}::text as "${k}"`).join(', ');
	const rows = await em.getConnection().execute<
		({ id: string; loop_id: string; criteria: string[]; starts_at: string | Date; expires_at: string | Date } & Targets)[]
	>(
		`select id, loop_id, criteria, starts_at, expires_at, ${columns} from deviation
		 where loop_id in (${list(loopIds.length)}) and revoked_at is null and starts_at <= ? and expires_at > ?`,
		[...loopIds, now, now],
		'all',
		em.getTransactionContext()
	);
	const byLoop = new Map<string, DeviationInput[]>();
	for (const row of rows) {
		const relaxed: Targets = {};
		for (const f of fieldsOf(row.criteria)) relaxed[f] = row[f] ?? null;
		// Raw queries return timestamps as text: compare them as dates.
		const d: DeviationInput = { id: row.id, relaxed, startsAt: new Date(row.starts_at), expiresAt: new Date(row.expires_at) };
		byLoop.set(row.loop_id, [...(byLoop.get(row.loop_id) ?? []), d]);
	}
	return byLoop;
}

/** Every target field of the listed criteria: a listed field left NULL means waived. */
const fieldsOf = (criteria: string[]) => criteria.flatMap((c) => TARGET_FIELDS[c as Criterion] ?? []);

function stateOf(row: LoopRow): RevisionState {
	if (row.result) return 'computed';
	if (row.has_pending) return 'pending';
	if (row.has_rejected) return 'rejected';
	return 'empty';
}

/** A compact copy of the worst case on the loop row, for dashboard columns and sorting. */
function worstColumns(w: WorstCase | undefined) {
	return {
		pm: w?.phaseMarginDeg ?? null,
		gm: w?.upperGainMarginDb ?? null,
		dm: w?.delayMarginSeconds ?? null,
		mm: w?.modulusMargin ?? null
	};
}

/** Judge the given loops (any number; batched) and store what changed. */
export async function judgeLoops(
	em: EntityManager,
	loopIds: string[],
	cause: JudgeCause,
	now = new Date()
): Promise<VerdictChange[]> {
	const changes: VerdictChange[] = [];
	for (let i = 0; i < loopIds.length; i += BATCH) {
		changes.push(...(await judgeBatch(em, loopIds.slice(i, i + BATCH), cause, now)));
	}
	return changes;
}

async function judgeBatch(em: EntityManager, ids: string[], cause: JudgeCause, now: Date) {
	const loops = await loadLoops(em, ids);
	if (!loops.length) return [];
	const requirements = await loadTargets(em, [...new Set(loops.map((l) => l.class_id))]);
	const deviations = await loadDeviations(em, ids, now);
	const updates: unknown[] = [];
	const events: unknown[] = [];
	const changes: VerdictChange[] = [];
	for (const loop of loops) {
		const requirement = requirements.get(loop.class_id);
		const j: Judgement = judge({
			state: stateOf(loop),
			result: loop.result,
			targets: requirement?.targets ?? {},
			deviations: deviations.get(loop.id) ?? [],
			now
		});
		const w = worstColumns(loop.result?.worstCase);
		// Arrays go in as JSON text (see below); the dashboard filters on them through a GIN index.
		const short = JSON.stringify(shortCriteria(j));
		updates.push(loop.id, j.verdict, JSON.stringify(j), loop.revision_id, requirement?.id ?? null, w.pm, w.gm, w.dm, w.mm, short, worstShortfall(j));
		if (j.verdict !== loop.verdict) {
			const eventId = crypto.randomUUID();
			const worse = VERDICT_RANK[j.verdict] > VERDICT_RANK[loop.verdict];
			events.push(eventId, loop.id, j.verdict, loop.verdict, loop.revision_id, requirement?.id ?? null, JSON.stringify(j.failing), JSON.stringify(j.criteria), cause, now, worse);
			changes.push({ loopId: loop.id, eventId, from: loop.verdict, to: j.verdict, worse });
		}
	}
	const conn = em.getConnection();
	const ctx = em.getTransactionContext();
	const rows = loops.map(() => '(?::uuid, ?, ?::jsonb, ?::uuid, ?::uuid, ?::float8, ?::float8, ?::float8, ?::float8, ?::jsonb, ?::float8)').join(', ');
	await conn.execute(
		`update loop l set verdict = v.verdict, verdict_detail = v.detail, judged_revision_id = v.revision_id,
		        judged_requirement_id = v.requirement_id, judged_at = ?,
		        verdict_changed_at = case when l.verdict is distinct from v.verdict then ? else l.verdict_changed_at end,
		        wc_phase_margin_deg = v.pm, wc_upper_gain_margin_db = v.gm, wc_delay_margin_s = v.dm, wc_modulus_margin = v.mm,
		        failing_criteria = array(select jsonb_array_elements_text(v.short)), worst_shortfall = v.worst
		 from (values ${rows}) as v(id, verdict, detail, revision_id, requirement_id, pm, gm, dm, mm, short, worst)
		 where l.id = v.id`,
		[now, now, ...updates],
		'run',
		ctx
	);
	if (changes.length) {
		// Arrays go in as JSON text: knex would splice a JS array into a value list.
		const values = changes
			.map(() => '(?::uuid, ?::uuid, ?, ?, ?::uuid, ?::uuid, array(select jsonb_array_elements_text(?::jsonb)), ?::jsonb, ?, ?, ?)')
			.join(', ');
		await conn.execute(
			`insert into verdict_event (id, loop_id, verdict, previous_verdict, revision_id, requirement_id, failing, criteria, cause, at, worse)
			 values ${values}`,
			events,
			'run',
			ctx
		);
	}
	return changes;
}
