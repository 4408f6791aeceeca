import type { Handle } from '@sveltejs/kit';
import { handleAuthJs } from '../auth/authjs';
import { isApiPath } from '../auth/guard';
import { principalFromBearer, principalFromSession, type Principal } from '../auth/principal';
import { forkEm } from '../db/orm';
import { apiError } from '../http/respond';
import { chain } from './chain';

/** API routes open to anonymous callers; each route still says so itself (see the guard test). */
const PUBLIC_API = new Set(['/api/health', '/api/storage-events']);

/**
 * Fill locals.user and locals.scopes from a bearer token (API routes only: browsers never send
 * one on their own, so it needs no CSRF defence) or else from the Auth.js session cookie.
 */
const handleLocals: Handle = async ({ event, resolve }) => {
	const api = isApiPath(event.url);
	const authorization = event.request.headers.get('authorization');
	let principal: Principal | null = null;
	if (api && authorization !== null) {
		const bearer = /^Bearer\s+(\S+)\s*$/i.exec(authorization)?.[1];
		principal = bearer ? await principalFromBearer(forkEm, bearer) : null;
		// A wrong token is an error even on public routes: the caller meant to authenticate.
		if (!principal) return apiError(401, 'unauthenticated', 'The API token is not valid.');
	} else {
		const session = await event.locals.auth();
		const userId = session?.user?.id;
		if (userId)
			principal = await principalFromSession(await forkEm(), {
				userId,
				signedInAt: session.signedInAt
			});
	}
	event.locals.user = principal?.user ?? null;
	event.locals.scopes = principal?.scopes ?? [];
	// Defence in depth: the route's guard answers the same, but an anonymous API call should not
	// reach route code at all.
	if (api && !event.locals.user && !PUBLIC_API.has(event.url.pathname)) {
		return apiError(
			401,
			'unauthenticated',
			'Sign in or send an API token (Authorization: Bearer …).'
		);
	}
	return resolve(event);
};

/**
 * Auth.js re-sets the session cookie it refreshes by parsing its own Set-Cookie header, which
 * drops an absent `Secure` flag; SvelteKit then defaults to Secure on any host but localhost, and
 * browsers discard such a cookie over plain http (e.g. `npm start` on 127.0.0.1). Default the
 * flag to the protocol users reach us by instead; explicit options still win.
 */
const handleCookieSecurity: Handle = async ({ event, resolve }) => {
	const secure = event.url.protocol === 'https:';
	const set = event.cookies.set.bind(event.cookies);
	event.cookies.set = (name, value, options) => set(name, value, { secure, ...options });
	return resolve(event);
};

/**
 * Auth.js answers some of its own routes (errors, /auth/*) with Response.redirect(), whose
 * headers are immutable; the outer hooks add security headers and the request id to every
 * answer, so hand them a mutable copy.
 */
const handleAuthRoutes: Handle = async (input) => {
	// An API call with a token is authenticated by the token alone (handleLocals) and never by
	// the session cookie; Auth.js, which builds its configuration for every request it sees,
	// has nothing to do for it.
	const { event } = input;
	if (isApiPath(event.url) && event.request.headers.has('authorization'))
		return input.resolve(event);
	const response = await handleAuthJs(input);
	return input.event.url.pathname.startsWith('/auth/')
		? new Response(response.body, response)
		: response;
};

export const handleAuth: Handle = chain(handleCookieSecurity, handleAuthRoutes, handleLocals);
