import type { EntityManager } from '@mikro-orm/postgresql';
import { LoopClassSchema, UserSchema, type LoopClass, type User } from '../db/entities';
import { atLeast } from '../../auth/roles';
import { Conflict, Invalid, NotFound } from '../errors';
import { classSchema, classUpdateSchema, requirementSchema } from '../../registry/schemas';
import { TARGET_KEYS, thresholdsFromJson } from '../../registry/targets';
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
import { classSnapshot, recordAudit } from './audit';
import { findPerson } from './people';
import { loopCounts } from './products';
import {
	currentRequirements,
	insertVersion,
	requirementView,
	type RequirementView
} from './requirements';

export interface ClassView {
	id: string;
	key: string;
	name: string;
	description: string;
	lead: UserRef | null;
	openUploads: boolean;
	createdAt: string;
	loopCount: number;
	/** The version in force; null until a lead sets targets. */
	requirement: RequirementView | null;
}

export async function classByKey(em: EntityManager, key: string): Promise<LoopClass> {
	const loopClass = await em.findOne(LoopClassSchema, { key }, { populate: ['lead'] });
	if (!loopClass) throw new NotFound(`No loop class ${key}.`);
	return loopClass;
}

async function views(em: EntityManager, rows: LoopClass[]): Promise<ClassView[]> {
	const counts = await loopCounts(em, 'loop_class_id');
	const reqs = await currentRequirements(
		em,
		rows.map((c) => c.id)
	);
	return rows.map((c) => {
		const r = reqs.get(c.id);
		return {
			id: c.id,
			key: c.key,
			name: c.name,
			description: c.description,
			lead: c.lead ? userRef(c.lead) : null,
			openUploads: c.openUploads,
			createdAt: c.createdAt.toISOString(),
			loopCount: counts.get(c.id) ?? 0,
			requirement: r ? requirementView(r, c.key) : null
		};
	});
}

export async function listClasses(em: EntityManager, paging: Paging): Promise<PageOf<ClassView>> {
	const [rows, total] = await em.findAndCount(
		LoopClassSchema,
		{},
		{
			populate: ['lead'],
			orderBy: { key: 'asc' },
			limit: paging.pageSize,
			offset: offsetOf(paging)
		}
	);
	return { items: await views(em, rows), total, ...paging };
}

export async function getClass(em: EntityManager, key: string): Promise<ClassView> {
	return (await views(em, [await classByKey(em, key)]))[0];
}

async function leadFrom(em: EntityManager, ref: string): Promise<User | null> {
	if (!ref) return null;
	const user = await findPerson(em, ref, 'lead');
	if (!atLeast(user.role, 'lead')) throw new Invalid(`${user.name} is not a lead.`, 'lead');
	return user;
}

/**
 * Leads add classes. Targets may come along (`targets` with a `reason`): they become version 1
 * in the same transaction, so a class never exists half-made.
 */
export async function createClass(
	em: EntityManager,
	actor: Actor,
	input: unknown
): Promise<ClassView> {
	demandRole(actor, 'lead', 'add loop classes');
	const raw = (input ?? {}) as Record<string, unknown>;
	const { targets: rawTargets, ...rest } = raw;
	const data = parseInput(classSchema, rest);
	const initial =
		rawTargets === undefined || rawTargets === null
			? null
			: parseInput(requirementSchema, {
					reason: 'Initial targets',
					...(thresholdsFromJson(rawTargets) as object)
				});
	if (initial && TARGET_KEYS.every((k) => initial[k] === '')) {
		throw new Invalid('Give at least one target, or leave targets out.', 'targets');
	}
	if (await em.count(LoopClassSchema, { key: data.key })) {
		throw new Conflict(`A loop class with key ${data.key} exists already.`, 'key');
	}
	const lead = await leadFrom(em, data.lead);
	try {
		const created = await em.transactional(async (tx) => {
			const c = tx.create(LoopClassSchema, {
				key: data.key,
				name: data.name,
				description: data.description,
				lead: lead ? tx.getReference(UserSchema, lead.id) : null,
				openUploads: data.openUploads,
				createdAt: new Date()
			});
			await tx.flush();
			recordAudit(tx, {
				actorId: actor.id,
				action: 'loop_class.create',
				entityType: 'loop_class',
				entityId: c.id,
				after: classSnapshot(c)
			});
			if (initial) {
				const { reason, ...targets } = initial;
				await insertVersion(tx, actor, c, targets, reason, 1);
			}
			return c;
		});
		return getClass(em.fork(), created.key);
	} catch (error) {
		fromDbError(error, { loop_class_key_unique: 'key' });
	}
}

/** Name, description, lead and the open-uploads switch; the key stays. */
export async function updateClass(
	em: EntityManager,
	actor: Actor,
	key: string,
	input: unknown
): Promise<ClassView> {
	demandRole(actor, 'lead', 'edit loop classes');
	const data = parseInput(classUpdateSchema, input);
	const loopClass = await classByKey(em, key);
	const lead = await leadFrom(em, data.lead);
	const before = classSnapshot(loopClass);
	await em.transactional(async (tx) => {
		const c = await tx.findOneOrFail(LoopClassSchema, { id: loopClass.id });
		Object.assign(c, {
			name: data.name,
			description: data.description,
			lead: lead ? tx.getReference(UserSchema, lead.id) : null,
			openUploads: data.openUploads
		});
		const after = classSnapshot(c);
		if (JSON.stringify(after) === JSON.stringify(before)) return;
		recordAudit(tx, {
			actorId: actor.id,
			action: 'loop_class.update',
			entityType: 'loop_class',
			entityId: c.id,
			before,
			after
		});
	});
	return getClass(em.fork(), key);
}
