import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { pagingFrom } from '$lib/server/registry/common';
import { createClass, listClasses } from '$lib/server/registry/classes';
import type { RequestHandler } from './$types';

export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		return json(await listClasses(await forkEm(), pagingFrom(event.url.searchParams)));
	})) satisfies RequestHandler;

/** Body: { key, name, description?, lead? (e-mail), openUploads?, targets?: { …Targets } }. */
export const POST = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'lead');
		requireScope(event, 'upload');
		const created = await createClass(await forkEm(), user, await readJsonObject(event.request));
		return json(created, { status: 201 });
	})) satisfies RequestHandler;
