/**
 * Loops: create, edit, archive (the list itself is loop-list.ts, re-exported here). A loop is never deleted (revisions and the
 * audit trail point at it); archiving hides it from lists and refuses edits until restored.
 * Engineers edit the loops they own; leads and admins edit any and may move a loop to another
 * owner, product or class.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { LoopClassSchema, LoopSchema, ProductSchema, UserSchema, type Loop } from '../db/entities';
import { atLeast } from '../../auth/roles';
import { Conflict, Forbidden, Invalid, NotFound } from '../errors';
import { loopPatchSchema, loopSchema } from '../../registry/schemas';
import type { Verdict } from '../../compliance/judge';
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
import { loopSnapshot, recordAudit } from './audit';
import { findOwner } from './people';
import { activeDeviationCounts } from './deviations';

export interface LoopView {
	id: string;
	key: string;
	name: string;
	product: { id: string; key: string; name: string };
	class: { id: string; key: string; name: string };
	owner: UserRef;
	tags: string[];
	note: string;
	verdict: Verdict;
	/** Active deviations right now: shown beside the verdict wherever it appears. */
	activeDeviations: number;
	archivedAt: string | null;
	createdAt: string;
	updatedAt: string;
}

export const loopView = (l: Loop, activeDeviations = 0): LoopView => ({
	id: l.id,
	key: l.key,
	name: l.name,
	product: { id: l.product.id, key: l.product.key, name: l.product.name },
	class: { id: l.loopClass.id, key: l.loopClass.key, name: l.loopClass.name },
	owner: userRef(l.owner),
	tags: [...l.tags],
	note: l.note,
	verdict: l.verdict,
	activeDeviations,
	archivedAt: iso(l.archivedAt),
	createdAt: l.createdAt.toISOString(),
	updatedAt: l.updatedAt.toISOString()
});

export { LOOP_SORTS, loopFiltersFrom, type LoopFilters, type LoopSort } from './loop-query';

export {
	countLoops,
	listJsonQuery,
	listLoops,
	listLoopsJson,
	listLoopsBody,
	listQuery,
	queryLoops,
	type LoopListItem
} from './loop-list';

export async function loopById(em: EntityManager, id: string): Promise<Loop> {
	const loop = isUuid(id)
		? await em.findOne(LoopSchema, { id }, { populate: ['product', 'loopClass', 'owner'] })
		: null;
	if (!loop) throw new NotFound('No such loop.');
	return loop;
}

export async function getLoop(em: EntityManager, id: string): Promise<LoopView> {
	const loop = await loopById(em, id);
	return loopView(loop, (await activeDeviationCounts(em, [loop.id])).get(loop.id) ?? 0);
}

/** May this person change this loop's name, key, tags, note and archive state? */
export function canEditLoop(actor: Actor, loop: { owner: { id: string } }): boolean {
	return atLeast(actor.role, 'lead') || (actor.role === 'engineer' && loop.owner.id === actor.id);
}

async function refs(em: EntityManager, productKey: string, classKey: string) {
	const product = await em.findOne(ProductSchema, { key: productKey });
	if (!product) throw new Invalid(`No product ${productKey}.`, 'product');
	const loopClass = await em.findOne(LoopClassSchema, { key: classKey });
	if (!loopClass) throw new Invalid(`No loop class ${classKey}.`, 'class');
	return { product, loopClass };
}

/** Engineers register loops they own; leads may name any owner. */
export async function createLoop(
	em: EntityManager,
	actor: Actor,
	input: unknown
): Promise<LoopView> {
	demandRole(actor, 'engineer', 'register loops');
	const data = parseInput(loopSchema, input);
	const { product, loopClass } = await refs(em, data.product, data.class);
	const owner = await findOwner(em, data.owner || actor.id);
	if (owner.id !== actor.id && !atLeast(actor.role, 'lead')) {
		throw new Forbidden('Engineers register loops they own; ask a lead to name someone else.');
	}
	if (await em.count(LoopSchema, { product, key: data.key })) {
		throw new Conflict(`${data.product} already has a loop ${data.key}.`, 'key');
	}
	try {
		const id = await em.transactional(async (tx) => {
			const now = new Date();
			const loop = tx.create(LoopSchema, {
				product: tx.getReference(ProductSchema, product.id),
				loopClass: tx.getReference(LoopClassSchema, loopClass.id),
				owner: tx.getReference(UserSchema, owner.id),
				key: data.key,
				name: data.name,
				tags: dedupe(data.tags),
				note: data.note,
				verdict: 'empty',
				createdAt: now,
				updatedAt: now
			});
			await tx.flush();
			recordAudit(tx, {
				actorId: actor.id,
				action: 'loop.create',
				entityType: 'loop',
				entityId: loop.id,
				after: loopSnapshot(loop)
			});
			return loop.id;
		});
		return getLoop(em.fork(), id);
	} catch (error) {
		fromDbError(error, { loop_product_key_unique: 'key' });
	}
}

export const dedupe = (tags: string[]) => [...new Set(tags.map((t) => t.trim()).filter(Boolean))];

/** Edit, archive (`archived: true`) or restore (`archived: false`) one loop. */
export async function updateLoop(
	em: EntityManager,
	actor: Actor,
	id: string,
	input: unknown
): Promise<LoopView> {
	const patch = parseInput(loopPatchSchema, input);
	const loop = await loopById(em, id);
	if (!canEditLoop(actor, loop))
		throw new Forbidden('Only the owner, a lead or an admin may change this loop.');
	const lead = atLeast(actor.role, 'lead');
	for (const field of ['owner', 'product', 'class'] as const) {
		if (patch[field] !== undefined && !lead)
			throw new Forbidden(`Only a lead may change a loop's ${field}.`);
	}
	const restoring = patch.archived === false;
	const edits = Object.keys(patch).filter((k) => k !== 'archived');
	if (loop.archivedAt && !restoring && edits.length)
		throw new Conflict('This loop is archived: restore it before editing.');

	const next = await refs(em, patch.product ?? loop.product.key, patch.class ?? loop.loopClass.key);
	const owner = patch.owner ? await findOwner(em, patch.owner) : loop.owner;
	const key = patch.key ?? loop.key;
	if (
		(key !== loop.key || next.product.id !== loop.product.id) &&
		(await em.count(LoopSchema, { product: next.product, key }))
	) {
		throw new Conflict(`${next.product.key} already has a loop ${key}.`, 'key');
	}
	const before = loopSnapshot(loop);
	try {
		await em.transactional(async (tx) => {
			const row = await tx.findOneOrFail(LoopSchema, { id: loop.id });
			row.product = tx.getReference(ProductSchema, next.product.id);
			row.loopClass = tx.getReference(LoopClassSchema, next.loopClass.id);
			row.owner = tx.getReference(UserSchema, owner.id);
			row.key = key;
			if (patch.name !== undefined) row.name = patch.name;
			if (patch.tags !== undefined) row.tags = dedupe(patch.tags);
			if (patch.note !== undefined) row.note = patch.note;
			if (patch.archived === true && !row.archivedAt) row.archivedAt = new Date();
			if (restoring) row.archivedAt = null;
			const after = loopSnapshot(row);
			if (JSON.stringify(after) === JSON.stringify(before)) return;
			row.updatedAt = new Date();
			const action =
				!before.archivedAt && after.archivedAt
					? 'loop.archive'
					: before.archivedAt && !after.archivedAt
						? 'loop.restore'
						: 'loop.update';
			recordAudit(tx, {
				actorId: actor.id,
				action,
				entityType: 'loop',
				entityId: row.id,
				before,
				after
			});
		});
	} catch (error) {
		fromDbError(error, { loop_product_key_unique: 'key' });
	}
	return getLoop(em.fork(), loop.id);
}
