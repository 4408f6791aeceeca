/**
 * The guards every load, action and +server.ts handler calls (tests/unit/security enforces it).
 * Pages: anonymous → /signin?next=…, wrong role → 403 page. API routes (/api/**): domain errors
 * that the api() wrapper turns into 401/403 JSON.
 */
import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import { atLeast, type Role, type Scope } from '../../auth/roles';
import { Forbidden, Unauthenticated } from '../errors';

/** What the guards read: any RequestEvent fits (and a test can build one by hand). */
type GuardEvent = Pick<RequestEvent, 'url' | 'request'> & { locals: Pick<App.Locals, 'user' | 'scopes'> };
export type CurrentUser = NonNullable<App.Locals['user']>;

export function isApiPath(url: URL): boolean {
	return url.pathname === '/api' || url.pathname.startsWith('/api/');
}

function deny(event: GuardEvent, message: string): never {
	if (isApiPath(event.url)) throw new Forbidden(message);
	error(403, message);
}

export function requireUser(event: GuardEvent): CurrentUser {
	const user = event.locals.user;
	if (user) return user;
	if (isApiPath(event.url)) throw new Unauthenticated('Sign in or send an API token (Authorization: Bearer …).');
	// After signing in a GET comes back to the page; a form post's target is not worth replaying.
	const back = event.request.method === 'GET' ? event.url.pathname + event.url.search : event.url.pathname;
	redirect(303, `/signin?next=${encodeURIComponent(back)}`);
}

export function requireRole(event: GuardEvent, role: Role): CurrentUser {
	const user = requireUser(event);
	if (!atLeast(user.role, role)) deny(event, `This needs the ${role} role or higher.`);
	return user;
}

export function requireScope(event: GuardEvent, scope: Scope): CurrentUser {
	const user = requireUser(event);
	if (!event.locals.scopes.includes(scope)) deny(event, `This needs the ${scope} scope.`);
	return user;
}
