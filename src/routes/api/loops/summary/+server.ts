import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { loopFiltersFrom } from '$lib/server/registry/loops';
import { loopSummary } from '$lib/server/registry/loop-summary';
import type { RequestHandler } from './$types';

/** Counts per verdict, per product and per class (× verdict) under the same filters as /api/loops. */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		return json(await loopSummary(await forkEm(), loopFiltersFrom(event.url.searchParams)));
	})) satisfies RequestHandler;
