import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { pagingFrom } from '$lib/server/registry/common';
import { createProduct, listProducts } from '$lib/server/registry/products';
import type { RequestHandler } from './$types';

export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		return json(await listProducts(await forkEm(), pagingFrom(event.url.searchParams)));
	})) satisfies RequestHandler;

export const POST = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'lead');
		requireScope(event, 'upload');
		const product = await createProduct(await forkEm(), user, await readJsonObject(event.request));
		return json(product, { status: 201 });
	})) satisfies RequestHandler;
