import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { getReportDetail } from '$lib/server/reports/exports';
import type { RequestHandler } from './$types';

/** One report: its state, and once rendered what it froze in (requirement versions, revisions). */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		return json({ report: await getReportDetail(await forkEm(), event.params.id) });
	})) satisfies RequestHandler;
