/**
 * The dashboard's state lives in its URL (filters, sort, page): every view is a link, the back
 * button restores it, and the server renders the first page from it. These helpers build the
 * next URL for a change and the matching API addresses.
 */
export { FILTER_KEYS };
export const DASHBOARD_PAGE_SIZE = 25;

import { LOOP_FILTER_KEYS as FILTER_KEYS } from '$lib/registry/loop-filters';

/** `url` with `changes` applied (null or '' removes a parameter); a filter change goes back to page 1. */
export function nextView(url: URL, changes: Record<string, string | null | undefined>): string {
	const next = new URL(url);
	for (const [k, v] of Object.entries(changes)) {
		if (v === null || v === undefined || v === '') next.searchParams.delete(k);
		else next.searchParams.set(k, v);
	}
	if (!('page' in changes)) next.searchParams.delete('page');
	return `${next.pathname}${next.search}`;
}

/** The filters and the order of a URL's query, not the page: the report link ("these loops, in this order"). */
export function viewSearch(url: URL): string {
	const out = new URLSearchParams();
	for (const k of [...FILTER_KEYS, 'sort', 'dir']) {
		const v = url.searchParams.get(k);
		if (v) out.set(k, v);
	}
	const s = out.toString();
	return s ? `?${s}` : '';
}

/** Whether any filter narrows the view (for the "matches nothing" empty state). */
export const isFiltered = (url: URL) =>
	FILTER_KEYS.some((k) => (k === 'archived' ? (url.searchParams.get(k) ?? 'active') !== 'active' : !!url.searchParams.get(k)));
