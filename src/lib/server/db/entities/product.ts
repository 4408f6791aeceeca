import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

/** A member of the product line. The key is what URLs, CSV imports and CI pipelines use. */
export const ProductSchema = defineEntity({
	name: 'Product',
	tableName: 'product',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		key: p.string().length(64).unique(),
		name: p.string().length(200),
		createdAt: p.datetime().defaultRaw('now()')
	},
	checks: [{ name: 'product_key_format', expression: "key ~ '^[a-z0-9][a-z0-9._-]*$'" }]
});

export type Product = InferEntity<typeof ProductSchema>;
