import { json, text, type Handle } from '@sveltejs/kit';
import { isApiPath } from '../auth/guard';

const FORM_TYPES = ['application/x-www-form-urlencoded', 'multipart/form-data', 'text/plain'];
const WRITES = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * SvelteKit's cross-origin check, with one exception it cannot make: API calls that carry an
 * `Authorization` header. SvelteKit refuses every form-typed write whose Origin is not ours, and
 * a pipeline's `curl -F file=@model.json` sends multipart without any Origin — so its own check
 * would refuse every token upload. A browser never adds an Authorization header to a cross-site
 * request on its own (that needs a CORS preflight, which we never grant), so such a request
 * cannot be forged by another site; the token it carries is checked by the auth hook, and a wrong
 * one is refused there. Everything else keeps the exact rule (kit's own check is switched off in
 * svelte.config.js so that this one decides).
 */
export const handleCsrf: Handle = async ({ event, resolve }) => {
	const { request, url } = event;
	if (WRITES.has(request.method)) {
		const type = (request.headers.get('content-type') ?? '').split(';', 1)[0].trim().toLowerCase();
		const origin = request.headers.get('origin');
		const bearerApi = isApiPath(url) && request.headers.has('authorization');
		if (FORM_TYPES.includes(type) && origin !== url.origin && !bearerApi) {
			const message = `Cross-site ${request.method} form submissions are forbidden`;
			return request.headers.get('accept') === 'application/json'
				? json({ message }, { status: 403 })
				: text(message, { status: 403 });
		}
	}
	return resolve(event);
};
