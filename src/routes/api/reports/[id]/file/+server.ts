import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { reportFile } from '$lib/server/reports/exports';
import type { RequestHandler } from './$types';

/** The rendered file; 409 while it is queued, rendering or failed. The name is ours, ASCII only. */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const file = await reportFile(await forkEm(), event.params.id);
		return new Response(file.bytes as BodyInit, {
			headers: {
				'content-type': file.contentType,
				'content-disposition': `attachment; filename="${file.fileName}"`,
				'content-length': String(file.bytes.byteLength),
				'cache-control': 'private, no-store',
				'x-content-type-options': 'nosniff'
			}
		});
	})) satisfies RequestHandler;
