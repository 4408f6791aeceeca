/**
 * A loop's history: every revision with its state, file, worst-case margins and the verdict it
 * got, the requirement versions of the loop's class with when each came into force, and the
 * comparison of any two revisions (margins and model summary; the model files are read from
 * the object store on demand).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { parseModelText, summarizeModel, type ModelSummary } from '../../margins';
import type { MarginsResult, WorstCase } from '../../margins/types';
import type { Verdict } from '../../compliance/judge';
import { diffRevisions } from '../../history/diff';
import { shortSha } from '../../history/format';
import { inForceAt } from '../../history/trend';
import type {
	ComparedRevision,
	HistoryRequirement,
	HistoryRevision,
	HistoryVerdict,
	LoopHistory,
	RevisionComparison
} from '../../history/types';
import {
	MarginReportSchema,
	RequirementSchema,
	RevisionSchema,
	type Revision
} from '../db/entities';
import { Invalid, NotFound } from '../errors';
import { fullTargets } from '../../registry/targets';
import { loopById } from '../registry/loops';
import { getObjectBytes } from '../storage/s3';

interface EventRow {
	verdict: Verdict;
	previous_verdict: Verdict;
	revision_id: string | null;
	requirement_version: number | null;
	failing: string[];
	cause: string;
	at: string | Date;
}

async function verdictEvents(em: EntityManager, loopId: string): Promise<EventRow[]> {
	return em.getConnection().execute<EventRow[]>(
		`select ve.verdict, ve.previous_verdict, ve.revision_id, rq.version as requirement_version, ve.failing, ve.cause, ve.at
		 from verdict_event ve left join requirement rq on rq.id = ve.requirement_id
		 where ve.loop_id = ? order by ve.at, ve.id`,
		[loopId]
	);
}

const toVerdict = (e: EventRow, changed = true): HistoryVerdict => ({
	verdict: e.verdict,
	previousVerdict: e.previous_verdict,
	// Raw SQL returns timestamps as text.
	at: new Date(e.at).toISOString(),
	cause: e.cause,
	failing: [...e.failing],
	requirementVersion: e.requirement_version,
	changed
});

/**
 * Events only record changes. A revision judged to the verdict the loop already had has no event
 * of its own: it kept the verdict of the latest event before it (judgements of older revisions
 * all happen before a newer one is computed, since the newest computed revision is the one judged).
 */
function verdictsOf(r: Revision, numberOf: Map<string, number>, events: EventRow[]) {
	if (r.state !== 'computed') return { verdict: null, later: [] as HistoryVerdict[] };
	const own = events.filter((e) => e.revision_id === r.id);
	const arrival = own.find((e) => e.cause === 'revision' || e.cause === 'reconcile');
	const later = own.filter((e) => e !== arrival).map((e) => toVerdict(e));
	if (arrival) return { verdict: toVerdict(arrival), later };
	const before = events
		.filter((e) => e.revision_id && (numberOf.get(e.revision_id) ?? Infinity) < r.number)
		.at(-1);
	return { verdict: before ? toVerdict(before, false) : null, later };
}

interface ReportRow {
	revision_id: string;
	engine_version: string;
	worst_case: WorstCase;
	case_names: string[];
}

/** Only the worst case and the case names of each report: the full results (every case, poles) stay in the database. */
async function worstCases(
	em: EntityManager,
	revisionIds: string[]
): Promise<Map<string, ReportRow>> {
	if (!revisionIds.length) return new Map();
	const rows = await em.getConnection().execute<ReportRow[]>(
		`select revision_id, engine_version, result->'worstCase' as worst_case,
		        coalesce((select jsonb_agg(c->'name') from jsonb_array_elements(result->'cases') c), '[]'::jsonb) as case_names
		 from margin_report where revision_id in (select jsonb_array_elements_text(?::jsonb)::uuid)`,
		[JSON.stringify(revisionIds)]
	);
	return new Map(rows.map((r) => [r.revision_id, r]));
}

export async function loopHistory(em: EntityManager, loopId: string): Promise<LoopHistory> {
	const loop = await loopById(em, loopId);
	const rows = await em.find(
		RevisionSchema,
		{ loop: loop.id },
		{ populate: ['uploadedBy'], orderBy: { number: 'asc' } }
	);
	const byRevision = await worstCases(
		em,
		rows.map((r) => r.id)
	);
	const versions = await em.find(
		RequirementSchema,
		{ loopClass: loop.loopClass.id },
		{ populate: ['author'], orderBy: { version: 'asc' } }
	);
	const requirements: HistoryRequirement[] = versions.map((q, i) => ({
		id: q.id,
		version: q.version,
		targets: fullTargets(q),
		reason: q.reason,
		author: { id: q.author.id, name: q.author.name },
		inForceFrom: q.createdAt.toISOString(),
		inForceUntil: versions[i + 1]?.createdAt.toISOString() ?? null
	}));
	const events = await verdictEvents(em, loop.id);
	const numberOf = new Map(rows.map((r) => [r.id, r.number]));
	const revisions: HistoryRevision[] = rows.map((r) => {
		const report = byRevision.get(r.id);
		const { verdict, later } = verdictsOf(r, numberOf, events);
		const judgedAt = (r.computedAt ?? r.uploadedAt).toISOString();
		return {
			id: r.id,
			number: r.number,
			state: r.state,
			note: r.note,
			fileName: r.fileName,
			sizeBytes: r.sizeBytes ?? null,
			sha256: r.sha256 ?? null,
			sha256Short: shortSha(r.sha256 ?? null),
			uploadedBy: { id: r.uploadedBy.id, name: r.uploadedBy.name },
			uploadedAt: r.uploadedAt.toISOString(),
			computedAt: r.computedAt?.toISOString() ?? null,
			error: r.errorMessage ? { message: r.errorMessage, path: r.errorPath ?? '' } : null,
			engineVersion: report?.engine_version ?? null,
			worstCase: report?.worst_case ?? null,
			caseNames: report?.case_names ?? [],
			requirementVersion:
				verdict?.requirementVersion ?? inForceAt(requirements, judgedAt)?.version ?? null,
			verdict,
			laterVerdicts: later
		};
	});
	return {
		loop: {
			id: loop.id,
			key: loop.key,
			name: loop.name,
			product: { key: loop.product.key, name: loop.product.name },
			class: { key: loop.loopClass.key, name: loop.loopClass.name }
		},
		revisions,
		requirements
	};
}

/** The engine's summary of a revision's model file, read from the object store. */
async function summaryOf(
	r: Revision
): Promise<{ summary: ModelSummary | null; problem: string | null }> {
	if (r.state === 'awaiting-upload')
		return { summary: null, problem: 'the file has not arrived yet' };
	let bytes: Uint8Array;
	try {
		bytes = await getObjectBytes(r.objectKey);
	} catch {
		return { summary: null, problem: 'the model file could not be read from storage just now' };
	}
	let text: string;
	try {
		text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		return { summary: null, problem: 'the file is not text' };
	}
	const parsed = parseModelText(text, r.fileName);
	if (!parsed.ok)
		return { summary: null, problem: `the model was refused: ${parsed.issue.message}` };
	return { summary: summarizeModel(parsed.model), problem: null };
}

/** A revision number from the query string, or a 400 naming the parameter. */
export function revisionNumber(raw: string | null, name: string): number | undefined {
	if (raw === null || raw === '') return undefined;
	if (!/^\d+$/.test(raw) || Number(raw) < 1)
		throw new Invalid(`${name} must be a revision number (1, 2, 3…).`, name);
	return Number(raw);
}

/** Compare revision `a` with revision `b` of a loop (the sentences say what changed since `a`). */
export async function compareRevisions(
	em: EntityManager,
	loopId: string,
	a: number,
	b: number
): Promise<RevisionComparison> {
	const loop = await loopById(em, loopId);
	const rows = await em.find(RevisionSchema, { loop: loop.id, number: { $in: [a, b] } });
	const find = (n: number, name: string) => {
		const row = rows.find((r) => r.number === n);
		if (!row) throw new NotFound(`This loop has no revision ${n} (${name}).`);
		return row;
	};
	const [ra, rb] = [find(a, 'a'), find(b, 'b')];
	const reports = await em.find(MarginReportSchema, { revision: { $in: [ra.id, rb.id] } });
	const resultOf = (r: Revision) =>
		(reports.find((m) => m.revision.id === r.id)?.result as MarginsResult | undefined) ?? null;
	const [sa, sb] = await Promise.all([summaryOf(ra), summaryOf(rb)]);
	const side = (r: Revision, s: { summary: ModelSummary | null }) => ({
		number: r.number,
		state: r.state,
		result: resultOf(r),
		summary: s.summary,
		error: r.errorMessage ? { message: r.errorMessage, path: r.errorPath ?? '' } : null
	});
	const compared = (
		r: Revision,
		s: { summary: ModelSummary | null; problem: string | null }
	): ComparedRevision => ({
		number: r.number,
		state: r.state,
		fileName: r.fileName,
		uploadedAt: r.uploadedAt.toISOString(),
		summary: s.summary,
		summaryProblem: s.problem
	});
	return {
		a: compared(ra, sa),
		b: compared(rb, sb),
		diff: diffRevisions(side(ra, sa), side(rb, sb))
	};
}
