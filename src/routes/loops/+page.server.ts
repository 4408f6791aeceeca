import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { atLeast } from '$lib/auth/roles';
import { forkEm } from '$lib/server/db/orm';
import { DomainError } from '$lib/server/errors';
import { pagingFrom } from '$lib/server/registry/common';
import { listLoops, loopFiltersFrom } from '$lib/server/registry/loops';
import { listProducts } from '$lib/server/registry/products';
import { listClasses } from '$lib/server/registry/classes';
import { listPeople } from '$lib/server/registry/people';
import type { PageServerLoad } from './$types';

// Filtering, sorting and paging happen in PostgreSQL (the registry may hold thousands of
// loops); the table drives them through the URL, so every view is a shareable link.
export const load = (async (event) => {
	const user = requireUser(event);
	const em = await forkEm();
	let filters, paging;
	try {
		filters = loopFiltersFrom(event.url.searchParams);
		paging = pagingFrom(event.url.searchParams, 25);
	} catch (e) {
		if (e instanceof DomainError) error(400, e.message);
		throw e;
	}
	const all = { page: 1, pageSize: 200 };
	return {
		loops: await listLoops(em, filters, paging),
		filters,
		products: (await listProducts(em, all)).items.map((p) => ({ key: p.key, name: p.name })),
		classes: (await listClasses(em, all)).items.map((c) => ({ key: c.key, name: c.name })),
		people: await listPeople(em, 'engineer'),
		canCreate: atLeast(user.role, 'engineer')
	};
}) satisfies PageServerLoad;
