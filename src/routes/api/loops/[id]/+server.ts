import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { getLoop, updateLoop } from '$lib/server/registry/loops';
import { listDeviations } from '$lib/server/registry/deviations';
import type { RequestHandler } from './$types';

/** The loop with its deviations (every status, newest first). */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const em = await forkEm();
		const loop = await getLoop(em, event.params.id);
		return json({ ...loop, deviations: await listDeviations(em, loop.id) });
	})) satisfies RequestHandler;

/**
 * Partial update: key, name, tags, note (owner or lead); owner, product, class (leads);
 * `archived: true` archives, `false` restores. There is no DELETE: loops are archived.
 */
export const PATCH = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'engineer');
		requireScope(event, 'upload');
		return json(await updateLoop(await forkEm(), user, event.params.id, await readJsonObject(event.request)));
	})) satisfies RequestHandler;
