import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { readJsonObject } from '$lib/server/http/body';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { pagingFrom } from '$lib/server/registry/common';
import { listReports, requestReport } from '$lib/server/reports/exports';
import type { RequestHandler } from './$types';

/** Reports, newest first (page, pageSize). Any signed-in role; tokens need the read scope. */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		return json(await listReports(await forkEm(), pagingFrom(event.url.searchParams, 20)));
	})) satisfies RequestHandler;

/**
 * Body: { format: "pdf" | "csv", filters?: { verdict, product, class, owner, failing, tag, q,
 * changedSince } } — the /api/loops filter names. 202: the render job is queued.
 * Viewers may request reports too: audits need the evidence (see src/lib/server/reports/exports.ts).
 */
export const POST = (async (event) =>
	api(async () => {
		const user = requireScope(event, 'read');
		const report = await requestReport(await forkEm(), user, await readJsonObject(event.request));
		return json({ report }, { status: 202, headers: { location: `/api/reports/${report.id}` } });
	})) satisfies RequestHandler;
