import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { getRequirement, setRequirement } from '$lib/server/registry/requirements';
import type { RequestHandler } from './$types';

/** The targets in force (the highest version). */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		return json(await getRequirement(await forkEm(), event.params.key));
	})) satisfies RequestHandler;

/**
 * A new version: the complete targets (an absent or null field = no target) and a `reason`.
 * Thresholds as strings are stored exactly as written; numbers go through their shortest form.
 */
export const PUT = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'lead');
		requireScope(event, 'upload');
		const saved = await setRequirement(await forkEm(), user, event.params.key, await readJsonObject(event.request));
		return json(saved, { status: 201 });
	})) satisfies RequestHandler;
