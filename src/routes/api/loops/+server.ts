import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { pagingFrom } from '$lib/server/registry/common';
import { createLoop, listLoopsBody, loopFiltersFrom } from '$lib/server/registry/loops';
import type { RequestHandler } from './$types';

/**
 * Filters q, product, class, owner, verdict, failing, tag, changedSince, archived; sort, dir,
 * page, pageSize (see loop-query.ts and the README's API section).
 */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const params = event.url.searchParams;
		// The page's JSON from the loops' stored items, kept between writes (listLoopsBody); a
		// fork only when it has to be read.
		const body = await listLoopsBody(forkEm, loopFiltersFrom(params), pagingFrom(params));
		return new Response(body, {
			headers: { 'content-type': 'application/json', 'content-length': String(body.byteLength) }
		});
	})) satisfies RequestHandler;

/** Body: { product, class, key, name, owner? (e-mail; default you), tags?: [], note? }. */
export const POST = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'engineer');
		requireScope(event, 'upload');
		const loop = await createLoop(await forkEm(), user, await readJsonObject(event.request));
		return json(loop, { status: 201 });
	})) satisfies RequestHandler;
