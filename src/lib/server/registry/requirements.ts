/**
 * Versioned margin targets of a loop class. A requirement row is never changed: saving targets
 * writes version n+1 with its author, time and reason, and the highest version is in force.
 * Two people saving at once cannot both get the same number: the unique (class, version)
 * constraint refuses the second, which is told to reload.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { enqueueInTx } from '../jobs/enqueue';
import { QUEUES } from '../jobs/queues';
import { RequirementSchema, UserSchema, type LoopClass, type Requirement } from '../db/entities';
import { Conflict, Invalid, NotFound } from '../errors';
import { requirementSchema } from '../../registry/schemas';
import {
	compareTargets,
	fullTargets,
	sameTargets,
	thresholdsFromJson,
	type TargetChange,
	type Targets
} from '../../registry/targets';
import {
	demandRole,
	fromDbError,
	offsetOf,
	parseInput,
	userRef,
	type Actor,
	type PageOf,
	type Paging,
	type UserRef
} from './common';
import { recordAudit, requirementSnapshot } from './audit';
import { classByKey } from './classes';

export interface RequirementView {
	id: string;
	classKey: string;
	version: number;
	targets: Required<Targets>;
	author: UserRef;
	reason: string;
	createdAt: string;
}

export const requirementView = (r: Requirement, classKey: string): RequirementView => ({
	id: r.id,
	classKey,
	version: r.version,
	targets: fullTargets(r),
	author: userRef(r.author),
	reason: r.reason,
	createdAt: r.createdAt.toISOString()
});

/** The version in force for each class id given (classes without targets are absent). */
export async function currentRequirements(
	em: EntityManager,
	classIds: string[]
): Promise<Map<string, Requirement>> {
	if (!classIds.length) return new Map();
	const ids = await em.getConnection().execute<{ id: string }[]>(
		`select distinct on (loop_class_id) id from requirement where loop_class_id in (${classIds.map(() => '?').join(', ')})
			 order by loop_class_id, version desc`,
		classIds
	);
	const rows = ids.length
		? await em.find(
				RequirementSchema,
				{ id: { $in: ids.map((r) => r.id) } },
				{ populate: ['author'] }
			)
		: [];
	return new Map(rows.map((r) => [r.loopClass.id, r]));
}

export async function currentRequirement(
	em: EntityManager,
	loopClass: LoopClass
): Promise<Requirement | null> {
	return (await currentRequirements(em, [loopClass.id])).get(loopClass.id) ?? null;
}

export async function getRequirement(
	em: EntityManager,
	classKey: string
): Promise<RequirementView> {
	const loopClass = await classByKey(em, classKey);
	const current = await currentRequirement(em, loopClass);
	if (!current) throw new NotFound(`Class ${classKey} has no margin targets yet.`);
	return requirementView(current, classKey);
}

export async function getRequirementVersion(
	em: EntityManager,
	classKey: string,
	version: number
): Promise<RequirementView> {
	const loopClass = await classByKey(em, classKey);
	const row = await em.findOne(RequirementSchema, { loopClass, version }, { populate: ['author'] });
	if (!row) throw new NotFound(`Class ${classKey} has no version ${version}.`);
	return requirementView(row, classKey);
}

export async function requirementHistory(
	em: EntityManager,
	classKey: string,
	paging: Paging
): Promise<PageOf<RequirementView>> {
	const loopClass = await classByKey(em, classKey);
	const [rows, total] = await em.findAndCount(
		RequirementSchema,
		{ loopClass },
		{
			populate: ['author'],
			orderBy: { version: 'desc' },
			limit: paging.pageSize,
			offset: offsetOf(paging)
		}
	);
	return { items: rows.map((r) => requirementView(r, classKey)), total, ...paging };
}

/** Write the next version inside the caller's transaction (also used when a class is created). */
export async function insertVersion(
	tx: EntityManager,
	actor: Actor,
	loopClass: LoopClass,
	targets: Targets,
	reason: string,
	version: number
): Promise<Requirement> {
	const row = tx.create(RequirementSchema, {
		loopClass,
		version,
		...fullTargets(targets),
		author: tx.getReference(UserSchema, actor.id),
		reason,
		createdAt: new Date()
	});
	await tx.flush();
	// Every loop of the class is judged again against the new version, by a worker.
	await enqueueInTx(tx, QUEUES.rejudgeClass, { classId: loopClass.id, cause: 'requirement' });
	recordAudit(tx, {
		actorId: actor.id,
		action: 'requirement.create',
		entityType: 'requirement',
		entityId: row.id,
		after: requirementSnapshot(row)
	});
	return row;
}

/** Leads change targets: a new version, refused when nothing changed or someone saved first. */
export async function setRequirement(
	em: EntityManager,
	actor: Actor,
	classKey: string,
	input: unknown,
	/** The version the editor started from, when known: saving over a newer one is a conflict. */
	basedOn?: number
): Promise<RequirementView> {
	demandRole(actor, 'lead', 'change margin targets');
	const { reason, ...targets } = parseInput(requirementSchema, thresholdsFromJson(input));
	const loopClass = await classByKey(em, classKey);
	const current = await currentRequirement(em, loopClass);
	if (basedOn !== undefined && (current?.version ?? 0) !== basedOn) {
		throw new Conflict(
			`Version ${current?.version} was saved meanwhile; reload to see it before changing the targets.`
		);
	}
	if (current && sameTargets(current, targets)) {
		throw new Invalid(`These targets are the same as version ${current.version}: nothing to save.`);
	}
	try {
		const row = await em.transactional((tx) =>
			insertVersion(tx, actor, loopClass, targets, reason, (current?.version ?? 0) + 1)
		);
		await em.populate(row, ['author']);
		return requirementView(row, classKey);
	} catch (error) {
		if (error instanceof Error && error.message.includes('requirement_class_version_unique')) {
			throw new Conflict(
				'Someone saved new targets for this class at the same moment; reload and try again.'
			);
		}
		fromDbError(error);
	}
}

export interface VersionComparison {
	a: RequirementView;
	b: RequirementView;
	changes: TargetChange[];
}

export async function compareVersions(
	em: EntityManager,
	classKey: string,
	a: number,
	b: number
): Promise<VersionComparison> {
	const va = await getRequirementVersion(em, classKey, a);
	const vb = await getRequirementVersion(em, classKey, b);
	return { a: va, b: vb, changes: compareTargets(va.targets, vb.targets) };
}
