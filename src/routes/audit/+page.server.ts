import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { DomainError } from '$lib/server/errors';
import { pagingFrom } from '$lib/server/registry/common';
import { auditFacets, auditFiltersFrom, listAudit } from '$lib/server/registry/audit';
import type { PageServerLoad } from './$types';

// Read-only by design: the trail has no form and no action; the table refuses changes anyway.
export const load = (async (event) => {
	requireUser(event);
	const params = event.url.searchParams;
	let filters, paging;
	try {
		filters = auditFiltersFrom(params);
		paging = pagingFrom(params, 50);
	} catch (e) {
		if (e instanceof DomainError) error(400, e.message);
		throw e;
	}
	const em = await forkEm();
	return {
		events: await listAudit(em, filters, paging),
		facets: await auditFacets(em),
		selected: Object.fromEntries(['actor', 'entityType', 'entityId', 'action', 'from', 'to'].map((k) => [k, params.get(k) ?? '']))
	};
}) satisfies PageServerLoad;
