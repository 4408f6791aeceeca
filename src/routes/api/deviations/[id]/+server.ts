import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { revokeDeviation } from '$lib/server/registry/deviations';
import type { RequestHandler } from './$types';

/** Revokes: the deviation stops counting now but stays on record with who revoked it. */
export const DELETE = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'lead');
		requireScope(event, 'upload');
		return json(await revokeDeviation(await forkEm(), user, event.params.id));
	})) satisfies RequestHandler;
