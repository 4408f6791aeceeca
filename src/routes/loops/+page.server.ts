import { redirect } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import type { PageServerLoad } from './$types';

// The loop list is the dashboard at `/` (same filters, sorts and paging in the query string);
// old links and bookmarks to /loops?… land on the same view there.
export const load = (async (event) => {
	requireUser(event);
	redirect(308, `/${event.url.search}`);
}) satisfies PageServerLoad;
