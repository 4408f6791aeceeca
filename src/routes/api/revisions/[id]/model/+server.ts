import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { revisionObject } from '$lib/server/revisions/queries';
import { getObjectStream } from '$lib/server/storage/s3';
import type { RequestHandler } from './$types';

/**
 * The stored model file of a revision, as uploaded (JSON or CSV), streamed from storage: the
 * loop page computes plots and the what-if gain from it in the browser. Same read guard as
 * GET /api/revisions/[id].
 */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const object = await revisionObject(await forkEm(), event.params.id);
		const { body, size } = await getObjectStream(object.key);
		const headers: Record<string, string> = {
			'content-type': /\.csv$/i.test(object.fileName)
				? 'text/csv; charset=utf-8'
				: 'application/json; charset=utf-8',
			'content-disposition': `inline; filename="${object.fileName.replace(/[^\w.-]/g, '_')}"`,
			// a revision's file never changes once stored
			'cache-control': 'private, max-age=3600'
		};
		if (size !== null) headers['content-length'] = String(size);
		if (object.sha256) headers.etag = `"${object.sha256}"`;
		return new Response(body, { headers });
	})) satisfies RequestHandler;
