import type { EntityManager } from '@mikro-orm/postgresql';
import { ProductSchema, type Product } from '../db/entities';
import { Conflict, NotFound } from '../errors';
import { productSchema } from '../../registry/schemas';
import {
	demandRole,
	fromDbError,
	offsetOf,
	parseInput,
	type Actor,
	type PageOf,
	type Paging
} from './common';
import { productSnapshot, recordAudit } from './audit';

export interface ProductView {
	id: string;
	key: string;
	name: string;
	createdAt: string;
	/** Loops not archived. */
	loopCount: number;
}

async function loopCounts(
	em: EntityManager,
	column: 'product_id' | 'loop_class_id'
): Promise<Map<string, number>> {
	const rows = await em
		.getConnection()
		.execute<{ id: string; n: number }[]>(
			`select ${column} as id, count(*)::int as n from loop where archived_at is null group by ${column}`
		);
	return new Map(rows.map((r) => [r.id, r.n]));
}
export { loopCounts };

const view = (p: Product, counts: Map<string, number>): ProductView => ({
	id: p.id,
	key: p.key,
	name: p.name,
	createdAt: p.createdAt.toISOString(),
	loopCount: counts.get(p.id) ?? 0
});

export async function listProducts(
	em: EntityManager,
	paging: Paging
): Promise<PageOf<ProductView>> {
	const [rows, total] = await em.findAndCount(
		ProductSchema,
		{},
		{ orderBy: { key: 'asc' }, limit: paging.pageSize, offset: offsetOf(paging) }
	);
	const counts = await loopCounts(em, 'product_id');
	return { items: rows.map((p) => view(p, counts)), total, ...paging };
}

export async function productByKey(em: EntityManager, key: string): Promise<Product> {
	const product = await em.findOne(ProductSchema, { key });
	if (!product) throw new NotFound(`No product ${key}.`);
	return product;
}

/** Leads and admins add products; the key is permanent (URLs and CSV imports use it). */
export async function createProduct(
	em: EntityManager,
	actor: Actor,
	input: unknown
): Promise<ProductView> {
	demandRole(actor, 'lead', 'add products');
	const data = parseInput(productSchema, input);
	if (await em.count(ProductSchema, { key: data.key })) {
		throw new Conflict(`A product with key ${data.key} exists already.`, 'key');
	}
	try {
		const product = await em.transactional(async (tx) => {
			const p = tx.create(ProductSchema, { key: data.key, name: data.name, createdAt: new Date() });
			await tx.flush();
			recordAudit(tx, {
				actorId: actor.id,
				action: 'product.create',
				entityType: 'product',
				entityId: p.id,
				after: productSnapshot(p)
			});
			return p;
		});
		return view(product, new Map());
	} catch (error) {
		fromDbError(error, { product_key_unique: 'key' });
	}
}
