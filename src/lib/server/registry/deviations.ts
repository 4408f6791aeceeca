/**
 * Deviations: a lead relaxes named criteria of one loop, with a reason and an expiry. Revoking
 * ends one early but keeps the row; expired and revoked deviations stay listed as history.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { enqueueInTx } from '../jobs/enqueue';
import { QUEUES } from '../jobs/queues';
import { DeviationSchema, LoopSchema, UserSchema, type Deviation } from '../db/entities';
import { isActive, type DeviationInput as JudgeDeviation } from '../../compliance/judge';
import { CRITERION_LABELS, TARGET_FIELDS, type Criterion } from '../../compliance/criteria';
import { Conflict, Invalid, NotFound } from '../errors';
import { deviationSchema, thresholdText } from '../../registry/schemas';
import {
	CRITERION_OF,
	TARGET_KEYS,
	fieldLabel,
	thresholdsFromJson,
	isLooser,
	normalizeDecimal,
	type TargetKey,
	type Targets
} from '../../registry/targets';
import {
	demandRole,
	fromDbError,
	iso,
	isUuid,
	parseInput,
	userRef,
	type Actor,
	type UserRef
} from './common';
import { deviationSnapshot, recordAudit } from './audit';
import { loopById } from './loops';
import { currentRequirement } from './requirements';

export type DeviationStatus = 'active' | 'scheduled' | 'expired' | 'revoked';

export interface DeviationView {
	id: string;
	loopId: string;
	criteria: Criterion[];
	/** Per listed criterion's field: the relaxed value, or null when that criterion is waived. */
	relaxed: Targets;
	reason: string;
	approvedBy: UserRef;
	startsAt: string;
	expiresAt: string;
	revokedAt: string | null;
	revokedBy: UserRef | null;
	createdAt: string;
	status: DeviationStatus;
}

/** The relaxed targets the verdict rules expect: every field of every listed criterion. */
export function relaxedOf(d: Pick<Deviation, 'criteria'> & Targets): Targets {
	const relaxed: Targets = {};
	for (const c of d.criteria as Criterion[])
		for (const f of TARGET_FIELDS[c]) relaxed[f] = normalizeDecimal(d[f]);
	return relaxed;
}

export function statusOf(d: Deviation, now: Date): DeviationStatus {
	if (d.revokedAt) return 'revoked';
	if (now >= d.expiresAt) return 'expired';
	return d.startsAt > now ? 'scheduled' : 'active';
}

export const deviationView = (d: Deviation, now = new Date()): DeviationView => ({
	id: d.id,
	loopId: d.loop.id,
	criteria: [...d.criteria],
	relaxed: relaxedOf(d),
	reason: d.reason,
	approvedBy: userRef(d.approvedBy),
	startsAt: d.startsAt.toISOString(),
	expiresAt: d.expiresAt.toISOString(),
	revokedAt: iso(d.revokedAt),
	revokedBy: d.revokedBy ? userRef(d.revokedBy) : null,
	createdAt: d.createdAt.toISOString(),
	status: statusOf(d, now)
});

/** For src/lib/compliance judge(): the deviation as the pure rules see it. */
export const toJudgeInput = (d: Deviation): JudgeDeviation => ({
	id: d.id,
	relaxed: relaxedOf(d),
	startsAt: d.startsAt,
	expiresAt: d.expiresAt,
	revokedAt: d.revokedAt
});

export async function listDeviations(em: EntityManager, loopId: string): Promise<DeviationView[]> {
	const loop = await loopById(em, loopId);
	const rows = await em.find(
		DeviationSchema,
		{ loop },
		{ populate: ['approvedBy', 'revokedBy'], orderBy: { createdAt: 'desc' } }
	);
	const now = new Date();
	return rows.map((d) => deviationView(d, now));
}

export async function activeDeviationCounts(
	em: EntityManager,
	loopIds: string[]
): Promise<Map<string, number>> {
	if (!loopIds.length) return new Map();
	const rows = await em.getConnection().execute<{ id: string; n: number }[]>(
		`select loop_id as id, count(*)::int as n from deviation
			 where loop_id in (${loopIds.map(() => '?').join(', ')}) and revoked_at is null and starts_at <= now() and expires_at > now()
			 group by loop_id`,
		loopIds
	);
	return new Map(rows.map((r) => [r.id, r.n]));
}

/**
 * A lead grants a deviation. Each relaxed value must ask less than the requirement in force
 * (a "deviation" that tightens a target is a mistake), and only listed criteria may carry one.
 */
export async function grantDeviation(
	em: EntityManager,
	actor: Actor,
	loopId: string,
	input: unknown,
	now = new Date()
): Promise<DeviationView> {
	demandRole(actor, 'lead', 'grant deviations');
	const raw = (input ?? {}) as { relaxed?: unknown };
	const data = parseInput(deviationSchema, { ...raw, relaxed: relaxedFromJson(raw.relaxed) });
	const loop = await loopById(em, loopId);
	if (loop.archivedAt)
		throw new Conflict('This loop is archived: restore it before granting a deviation.');
	const criteria = [...new Set(data.criteria)];
	const requirement = await currentRequirement(em, loop.loopClass);
	const values: Partial<Record<TargetKey, string | null>> = {};
	for (const [key, raw] of Object.entries(data.relaxed)) {
		const path = `relaxed.${key}`;
		if (!(TARGET_KEYS as string[]).includes(key))
			throw new Invalid(`Unknown target field ${key}.`, path);
		const field = key as TargetKey;
		if (!criteria.includes(CRITERION_OF[field])) {
			throw new Invalid(
				`${fieldLabel(field)} belongs to ${CRITERION_LABELS[CRITERION_OF[field]]}, which is not listed.`,
				path
			);
		}
		if (raw === null || raw.trim() === '') continue;
		const checked = thresholdText.safeParse(raw);
		if (!checked.success) throw new Invalid(checked.error.issues[0].message, path);
		values[field] = normalizeDecimal(checked.data);
	}
	for (const c of criteria) {
		const fields = TARGET_FIELDS[c];
		const required = fields.filter((f) => normalizeDecimal(requirement?.[f]) !== null);
		if (!required.length) {
			throw new Invalid(
				`The ${loop.loopClass.name} targets set no ${CRITERION_LABELS[c].toLowerCase()}: nothing to relax.`,
				'criteria'
			);
		}
		for (const f of fields) {
			const v = values[f];
			const req = normalizeDecimal(requirement?.[f]);
			if (v && req && !isLooser(f, v, req)) {
				throw new Invalid(
					`A deviation relaxes: ${fieldLabel(f)} ${v} asks at least as much as the target ${req}.`,
					`relaxed.${f}`
				);
			}
		}
	}
	const startsAt = data.startsAt ? new Date(data.startsAt) : now;
	const expiresAt = new Date(data.expiresAt);
	if (expiresAt <= startsAt)
		throw new Invalid('The expiry must come after the start.', 'expiresAt');
	if (expiresAt <= now) throw new Invalid('The expiry must be in the future.', 'expiresAt');
	try {
		const id = await em.transactional(async (tx) => {
			const d = tx.create(DeviationSchema, {
				loop: tx.getReference(LoopSchema, loop.id),
				criteria,
				...Object.fromEntries(TARGET_KEYS.map((k) => [k, values[k] ?? null])),
				reason: data.reason,
				approvedBy: tx.getReference(UserSchema, actor.id),
				startsAt,
				expiresAt,
				revokedAt: null,
				revokedBy: null,
				createdAt: now,
				// Judged right below when it starts at once; a later start is the scheduled pass's.
				startProcessedAt: startsAt <= now ? now : null
			});
			await tx.flush();
			recordAudit(tx, {
				actorId: actor.id,
				action: 'deviation.grant',
				entityType: 'deviation',
				entityId: d.id,
				after: deviationSnapshot(d)
			});
			await enqueueInTx(tx, QUEUES.rejudgeLoops, { loopIds: [loop.id], cause: 'deviation' });
			return d.id;
		});
		return deviationById(em.fork(), id);
	} catch (error) {
		fromDbError(error, {
			deviation_expires_after_start: 'expiresAt',
			deviation_criteria: 'criteria'
		});
	}
}

async function deviationById(em: EntityManager, id: string): Promise<DeviationView> {
	const d = isUuid(id)
		? await em.findOne(DeviationSchema, { id }, { populate: ['approvedBy', 'revokedBy'] })
		: null;
	if (!d) throw new NotFound('No such deviation.');
	return deviationView(d);
}

/** Leads end a deviation early; the row stays, marked with who revoked it and when. */
export async function revokeDeviation(
	em: EntityManager,
	actor: Actor,
	id: string,
	now = new Date()
): Promise<DeviationView> {
	demandRole(actor, 'lead', 'revoke deviations');
	const found = isUuid(id) ? await em.findOne(DeviationSchema, { id }) : null;
	if (!found) throw new NotFound('No such deviation.');
	if (found.revokedAt) throw new Conflict('This deviation was revoked already.');
	if (found.expiresAt <= now) throw new Conflict('This deviation has expired already.');
	await em.transactional(async (tx) => {
		const d = await tx.findOneOrFail(DeviationSchema, { id });
		const before = deviationSnapshot(d);
		d.revokedAt = now;
		d.revokedBy = tx.getReference(UserSchema, actor.id);
		recordAudit(tx, {
			actorId: actor.id,
			action: 'deviation.revoke',
			entityType: 'deviation',
			entityId: d.id,
			before,
			after: deviationSnapshot(d)
		});
		await tx.flush();
		await enqueueInTx(tx, QUEUES.rejudgeLoops, { loopIds: [d.loop.id], cause: 'deviation' });
	});
	return deviationById(em.fork(), id);
}

/** Numbers to decimal text; null becomes "" (both mean waived). */
function relaxedFromJson(relaxed: unknown): unknown {
	if (!relaxed || typeof relaxed !== 'object' || Array.isArray(relaxed)) return relaxed;
	return thresholdsFromJson(relaxed, Object.keys(relaxed));
}

export { isActive };
