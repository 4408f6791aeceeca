import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { grantDeviation } from '$lib/server/registry/deviations';
import type { RequestHandler } from './$types';

/**
 * Body: { criteria: ["phaseMargin"], relaxed: { minPhaseMarginDeg: "40" }, reason,
 * startsAt? (default now), expiresAt }. A listed criterion without a relaxed value is waived.
 */
export const POST = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'lead');
		requireScope(event, 'upload');
		const body = await readJsonObject(event.request);
		return json(await grantDeviation(await forkEm(), user, event.params.id, body), { status: 201 });
	})) satisfies RequestHandler;
