/**
 * Writes the demo scenario (demo-scenario.ts) into a fresh database, inside the seed's
 * transaction. Rows carry back-dated times so the history reads like a year of work, and each
 * gets the audit event the services would have written, at the same time and by the same person.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import {
	AuditEventSchema,
	DeviationSchema,
	LoopClassSchema,
	LoopSchema,
	ProductSchema,
	RequirementSchema,
	UserSchema
} from '../db/entities';
import type { Role } from '../../auth/roles';
import { TARGET_KEYS, fullTargets } from '../../registry/targets';
import type { Criterion } from '../../compliance/criteria';
import {
	classSnapshot,
	deviationSnapshot,
	loopSnapshot,
	productSnapshot,
	requirementSnapshot
} from '../registry/audit';
import { DEMO_CLASSES, DEMO_DEVIATIONS, DEMO_LOOPS, DEMO_PRODUCTS } from './demo-scenario';

const DAY = 86_400_000;

export async function seedRegistry(tx: EntityManager, userIds: Record<Role, string>, now = new Date()): Promise<void> {
	const ago = (days: number) => new Date(now.getTime() - days * DAY);
	const user = (role: Role) => tx.getReference(UserSchema, userIds[role]);
	const audit = (role: Role, at: Date, action: string, entityType: string, entityId: string, after: object, before: object | null = null) =>
		tx.create(AuditEventSchema, { at, actor: user(role), action, entityType, entityId, before: before as never, after: after as never });

	const founded = ago(260);
	const products = new Map(
		DEMO_PRODUCTS.map((p) => [p.key, tx.create(ProductSchema, { ...p, createdAt: founded })])
	);
	const classes = new Map(
		DEMO_CLASSES.map((c) => [
			c.key,
			tx.create(LoopClassSchema, {
				key: c.key,
				name: c.name,
				description: c.description,
				lead: user('lead'),
				openUploads: c.openUploads ?? false,
				createdAt: ago(c.versions[0].daysAgo)
			})
		])
	);
	await tx.flush();
	for (const p of products.values()) audit('lead', founded, 'product.create', 'product', p.id, productSnapshot(p));
	for (const c of classes.values()) audit('lead', c.createdAt, 'loop_class.create', 'loop_class', c.id, classSnapshot(c));

	const requirements = DEMO_CLASSES.flatMap((c) =>
		c.versions.map((v, i) =>
			tx.create(RequirementSchema, {
				loopClass: classes.get(c.key)!,
				version: i + 1,
				...fullTargets(v.targets),
				author: user(v.author),
				reason: v.reason,
				createdAt: ago(v.daysAgo)
			})
		)
	);
	const loops = new Map(
		DEMO_LOOPS.map((l, i) => {
			// Registered over the first months, a few a week.
			const createdAt = ago(230 - i * 4);
			return [
				`${l.product}/${l.key}`,
				tx.create(LoopSchema, {
					product: products.get(l.product)!,
					loopClass: classes.get(l.class)!,
					key: l.key,
					name: l.name,
					owner: user(l.owner),
					tags: l.tags ?? [],
					note: l.note ?? '',
					verdict: 'empty',
					createdAt,
					updatedAt: createdAt
				})
			];
		})
	);
	const deviations = DEMO_DEVIATIONS.map((d) =>
		tx.create(DeviationSchema, {
			loop: loops.get(`${d.product}/${d.loop}`)!,
			criteria: d.criteria as Criterion[],
			...Object.fromEntries(TARGET_KEYS.map((k) => [k, d.relaxed[k] ?? null])),
			reason: d.reason,
			approvedBy: user('lead'),
			startsAt: ago(d.startsDaysAgo),
			expiresAt: ago(-d.expiresInDays),
			revokedAt: null,
			revokedBy: null,
			createdAt: ago(d.startsDaysAgo)
		})
	);
	await tx.flush();
	for (const r of requirements) {
		const author = DEMO_CLASSES.find((c) => c.key === r.loopClass.key)!.versions[r.version - 1].author;
		audit(author, r.createdAt, 'requirement.create', 'requirement', r.id, requirementSnapshot(r));
	}
	for (const [id, l] of loops) {
		const owner = DEMO_LOOPS.find((d) => `${d.product}/${d.key}` === id)!.owner;
		audit(owner === 'engineer' ? 'engineer' : 'lead', l.createdAt, 'loop.create', 'loop', l.id, loopSnapshot(l));
	}
	for (const d of deviations) audit('lead', d.createdAt, 'deviation.grant', 'deviation', d.id, deviationSnapshot(d));
}
