import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { NotFound, Conflict } from '$lib/server/errors';
import { announceObject } from '$lib/server/revisions/upload';
import { getRevision } from '$lib/server/revisions/queries';
import { RevisionSchema } from '$lib/server/db/entities';
import type { RequestHandler } from './$types';

/** The client says its presigned upload finished (idempotent; the store's event may be first). */
export const POST = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'engineer');
		requireScope(event, 'upload');
		const em = await forkEm();
		const view = await getRevision(em, event.params.id);
		const row = await em.findOneOrFail(RevisionSchema, { id: view.id }, { populate: ['uploadedBy'] });
		if (row.uploadedBy.id !== user.id && user.role !== 'lead' && user.role !== 'admin') {
			throw new NotFound('No revision with this id.');
		}
		const outcome = await announceObject(em, row.objectKey);
		if (outcome === 'missing') throw new Conflict('The file has not arrived in storage yet: PUT it to the upload URL first.');
		return json({ revision: await getRevision(await forkEm(), view.id), outcome }, { status: 202 });
	})) satisfies RequestHandler;
