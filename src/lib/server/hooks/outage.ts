import type { Handle, RequestEvent } from '@sveltejs/kit';
import { isApiPath } from '../auth/guard';
import { isOutage } from '../errors';
import { apiError } from '../http/respond';

const MESSAGE = 'A service Headroom depends on is unavailable; try again shortly.';
const outages = new WeakSet<RequestEvent>();

/** Called by handleError: this request failed because PostgreSQL or the store is unreachable. */
export function markOutage(event: RequestEvent): void {
	outages.add(event);
}

function unavailable(event: RequestEvent): Response {
	if (isApiPath(event.url)) {
		const response = apiError(503, 'unavailable', MESSAGE);
		response.headers.set('retry-after', '5');
		return response;
	}
	return new Response(`<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Unavailable · Headroom</title></head><body><main><h1>Headroom is briefly unavailable</h1><p>${MESSAGE}</p></main></body></html>`, {
		status: 503,
		headers: { 'content-type': 'text/html; charset=utf-8', 'retry-after': '5' }
	});
}

/**
 * An outage answers 503 (with Retry-After), never 500 and never a hang: a lost database
 * connection in the hooks (reading the session's user) is caught here, and one inside a load,
 * action or endpoint — which SvelteKit renders as a 500 after calling handleError — is turned
 * into a 503 with the same body.
 */
export const handleOutage: Handle = async ({ event, resolve }) => {
	let response: Response;
	try {
		response = await resolve(event);
	} catch (error) {
		if (!isOutage(error)) throw error;
		console.error(`[outage] ${event.request.method} ${event.url.pathname}:`, error instanceof Error ? error.message : error);
		return unavailable(event);
	}
	if (response.status === 500 && outages.has(event)) {
		const headers = new Headers(response.headers);
		headers.set('retry-after', '5');
		return new Response(response.body, { status: 503, headers });
	}
	return response;
};
