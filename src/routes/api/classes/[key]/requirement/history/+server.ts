import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { pagingFrom } from '$lib/server/registry/common';
import { requirementHistory } from '$lib/server/registry/requirements';
import type { RequestHandler } from './$types';

/** Every version, newest first. */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const paging = pagingFrom(event.url.searchParams);
		return json(await requirementHistory(await forkEm(), event.params.key, paging));
	})) satisfies RequestHandler;
