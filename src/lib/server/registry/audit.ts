/**
 * The registry's side of the audit trail: what a snapshot of each record keeps, and the read
 * side (filters, paging) behind /audit. Writing goes through the one recordAudit of
 * src/lib/server/audit/audit.ts, inside the same transaction as the change; the table itself
 * refuses UPDATE and DELETE (trigger in the registry migration).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { AuditEventSchema, UserSchema } from '../db/entities';
import type { Deviation, Loop, LoopClass, Product, Requirement } from '../db/entities';
import { Invalid } from '../errors';
import { iso, isUuid, offsetOf, userRef, type PageOf, type Paging, type UserRef } from './common';
import { TARGET_KEYS, normalizeDecimal } from '../../registry/targets';

export { recordAudit } from '../audit/audit';

const targetsOf = (row: Requirement | Deviation) =>
	Object.fromEntries(TARGET_KEYS.map((k) => [k, normalizeDecimal(row[k])]));

export const productSnapshot = (p: Product) => ({ key: p.key, name: p.name });

export const classSnapshot = (c: LoopClass) => ({
	key: c.key,
	name: c.name,
	description: c.description,
	leadId: c.lead?.id ?? null,
	openUploads: c.openUploads
});

export const requirementSnapshot = (r: Requirement) => ({
	classId: r.loopClass.id,
	version: r.version,
	...targetsOf(r),
	reason: r.reason
});

export const loopSnapshot = (l: Loop) => ({
	productId: l.product.id,
	classId: l.loopClass.id,
	key: l.key,
	name: l.name,
	ownerId: l.owner.id,
	tags: [...l.tags],
	note: l.note,
	archivedAt: iso(l.archivedAt)
});

export const deviationSnapshot = (d: Deviation) => {
	const targets = targetsOf(d);
	return {
		loopId: d.loop.id,
		criteria: [...d.criteria],
		relaxed: Object.fromEntries(Object.entries(targets).filter(([, v]) => v !== null)),
		reason: d.reason,
		startsAt: iso(d.startsAt),
		expiresAt: iso(d.expiresAt),
		revokedAt: iso(d.revokedAt),
		revokedById: d.revokedBy?.id ?? null
	};
};

export interface AuditFilters {
	actor?: string;
	entityType?: string;
	entityId?: string;
	action?: string;
	from?: Date;
	to?: Date;
}

export interface AuditView {
	id: string;
	at: string;
	actor: UserRef | null;
	action: string;
	entityType: string;
	entityId: string;
	before: Record<string, unknown> | null;
	after: Record<string, unknown> | null;
}

/** Filters from a query string (`actor`, `entityType`, `action`, `from`, `to` as dates). */
export function auditFiltersFrom(params: URLSearchParams): AuditFilters {
	const date = (name: string, endOfDay: boolean) => {
		const raw = params.get(name)?.trim();
		if (!raw) return undefined;
		const d = new Date(/^\d{4}-\d{2}-\d{2}$/.test(raw) ? `${raw}T00:00:00Z` : raw);
		if (Number.isNaN(d.getTime())) throw new Invalid('Use a date such as 2026-12-01.', name);
		// "to 2026-12-01" includes that whole day.
		if (endOfDay && /^\d{4}-\d{2}-\d{2}$/.test(raw)) d.setUTCDate(d.getUTCDate() + 1);
		return d;
	};
	const text = (name: string) => params.get(name)?.trim() || undefined;
	return {
		actor: text('actor'),
		entityType: text('entityType'),
		entityId: text('entityId'),
		action: text('action'),
		from: date('from', false),
		to: date('to', true)
	};
}

export async function listAudit(
	em: EntityManager,
	f: AuditFilters,
	paging: Paging
): Promise<PageOf<AuditView>> {
	const where: Record<string, unknown> = {};
	if (f.actor === 'system') where.actor = null;
	else if (f.actor) where.actor = isUuid(f.actor) ? f.actor : { email: f.actor.toLowerCase() };
	if (f.entityType) where.entityType = f.entityType;
	if (f.entityId) where.entityId = f.entityId;
	if (f.action) where.action = f.action;
	if (f.from || f.to) where.at = { ...(f.from && { $gte: f.from }), ...(f.to && { $lt: f.to }) };
	const [rows, total] = await em.findAndCount(AuditEventSchema, where, {
		populate: ['actor'],
		orderBy: { id: 'desc' },
		limit: paging.pageSize,
		offset: offsetOf(paging)
	});
	return {
		items: rows.map((e) => ({
			id: String(e.id),
			at: e.at.toISOString(),
			actor: e.actor ? userRef(e.actor) : null,
			action: e.action,
			entityType: e.entityType,
			entityId: e.entityId,
			before: e.before ?? null,
			after: e.after ?? null
		})),
		total,
		...paging
	};
}

/** The values the filters can take, for the /audit selects. */
export async function auditFacets(em: EntityManager) {
	const conn = em.getConnection();
	const actions = await conn.execute<{ action: string }[]>(
		'select distinct action from audit_event order by action'
	);
	const types = await conn.execute<{ entity_type: string }[]>(
		'select distinct entity_type from audit_event order by entity_type'
	);
	const actorIds = await conn.execute<{ actor_id: string }[]>(
		'select distinct actor_id from audit_event where actor_id is not null'
	);
	const actors = actorIds.length
		? await em.find(
				UserSchema,
				{ id: { $in: actorIds.map((a) => a.actor_id) } },
				{ orderBy: { name: 'asc' } }
			)
		: [];
	return {
		actions: actions.map((a) => a.action),
		entityTypes: types.map((t) => t.entity_type),
		actors: actors.map(userRef)
	};
}
