import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { getRevision } from '$lib/server/revisions/queries';
import type { RequestHandler } from './$types';

/** `{ revision: { id, number, state, error?, margins? } }`; margins as headroom-margins/1. */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		return json({ revision: await getRevision(await forkEm(), event.params.id) });
	})) satisfies RequestHandler;
