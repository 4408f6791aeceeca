import type { Handle } from '@sveltejs/kit';

/** Give every request an id (kept from a proxy's x-request-id) that logs and errors quote. */
export const handleRequestId: Handle = async ({ event, resolve }) => {
	const incoming = event.request.headers.get('x-request-id');
	event.locals.requestId =
		incoming && /^[\w-]{6,64}$/.test(incoming) ? incoming : crypto.randomUUID();
	event.locals.user ??= null;
	event.locals.scopes ??= [];
	const response = await resolve(event);
	response.headers.set('x-request-id', event.locals.requestId);
	return response;
};
