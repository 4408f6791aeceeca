import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { presignRevision } from '$lib/server/revisions/upload';
import { revisionView } from '$lib/server/revisions/views';
import type { RequestHandler } from './$types';

/**
 * A presigned PUT for a large model file. Body: `{ "fileName"?, "note"? }`. PUT the file to
 * `uploadUrl`, then announce it with POST /api/revisions/:id/complete (or let the store's event
 * notification do it).
 */
export const POST = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'engineer');
		requireScope(event, 'upload');
		const body = event.request.headers.get('content-length') === '0' ? {} : await readJsonObject(event.request);
		const { revision, uploadUrl, expiresAt } = await presignRevision(await forkEm(), user, event.params.id, {
			fileName: typeof body.fileName === 'string' ? body.fileName : undefined,
			note: typeof body.note === 'string' ? body.note : undefined
		});
		return json({ revision: revisionView(revision), uploadUrl, expiresAt: expiresAt.toISOString() }, { status: 201 });
	})) satisfies RequestHandler;
