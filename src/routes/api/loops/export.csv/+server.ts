import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { loopFiltersFrom } from '$lib/server/registry/loops';
import { exportLoopsCsv } from '$lib/server/registry/loop-export';
import type { RequestHandler } from './$types';

/** Every loop matching the /api/loops filters (and in its sort order) as a CSV download. */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const filters = loopFiltersFrom(event.url.searchParams);
		const { rows, stream } = await exportLoopsCsv(await forkEm(), filters);
		// headroom-loops-20261202-0815.csv (UTC)
		const stamp = new Date().toISOString().slice(0, 16).replace(/[-:]/g, '').replace('T', '-');
		return new Response(stream, {
			headers: {
				'content-type': 'text/csv; charset=utf-8',
				'content-disposition': `attachment; filename="headroom-loops-${stamp}.csv"`,
				'x-total-count': String(rows),
				'cache-control': 'no-store'
			}
		});
	})) satisfies RequestHandler;
