import { redirect } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { domainFailure } from '$lib/server/http/action';
import { listReports, requestReport } from '$lib/server/reports/exports';
import {
	filtersFromQuery,
	filtersToQuery,
	REPORT_FILTER_NAMES,
	scopeInWords
} from '$lib/reports/filters';
import type { Actions, PageServerLoad } from './$types';

// The dashboard links here with its own filter query (/reports?verdict=noncompliant&…): the
// "New report" form takes its scope from the URL, so what you export is what you were looking at.
export const load = (async (event) => {
	requireUser(event);
	const filters = filtersFromQuery(event.url.searchParams);
	return {
		filters,
		scope: scopeInWords(filters),
		loopsQuery: filtersToQuery(filters).toString(),
		reports: await listReports(await forkEm(), { page: 1, pageSize: 50 })
	};
}) satisfies PageServerLoad;

export const actions = {
	// Without JavaScript the form posts here; with it the page calls POST /api/reports itself.
	create: async (event) => {
		const user = requireUser(event);
		const form = await event.request.formData();
		const filters = Object.fromEntries(
			REPORT_FILTER_NAMES.map((n) => [n, String(form.get(n) ?? '')]).filter(([, v]) => v !== '')
		);
		try {
			await requestReport(await forkEm(), user, {
				format: String(form.get('format') ?? ''),
				filters
			});
		} catch (e) {
			return domainFailure(e);
		}
		redirect(
			303,
			`/reports?${filtersToQuery(filtersFromQuery(new URLSearchParams(filters))).toString()}`
		);
	}
} satisfies Actions;
