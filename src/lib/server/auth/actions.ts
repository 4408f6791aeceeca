/**
 * Our form actions calling Auth.js. Its `signIn`/`signOut` read the request body themselves,
 * which superforms has already consumed, so they get a fresh request carrying exactly the fields
 * Auth.js needs. Their answers become SvelteKit redirects (303: the browser follows with GET).
 */
import { isRedirect, redirect, type RequestEvent } from '@sveltejs/kit';
import { AuthError, CredentialsSignin } from '@auth/sveltekit';
import { signIn, signOut } from './authjs';
import { safeNext } from './next';

function withBody(event: RequestEvent, fields: Record<string, string>): RequestEvent {
	const headers = new Headers(event.request.headers);
	headers.set('content-type', 'application/x-www-form-urlencoded');
	headers.delete('content-length');
	const request = new Request(event.request.url, {
		method: 'POST',
		headers,
		body: new URLSearchParams(fields)
	});
	return { ...event, request };
}

/** Password sign-in: resolves with the refusal code, or throws the redirect to `next`. */
export async function signInWithPasswordForm(
	event: RequestEvent,
	input: { email: string; password: string; next: string }
): Promise<'invalid' | 'rate_limited'> {
	const next = safeNext(input.next);
	try {
		await signIn(
			withBody(event, {
				providerId: 'credentials',
				email: input.email,
				password: input.password,
				redirectTo: next
			})
		);
	} catch (error) {
		if (isRedirect(error)) redirect(303, next);
		if (error instanceof CredentialsSignin) return error.code === 'rate_limited' ? 'rate_limited' : 'invalid';
		throw error;
	}
	// Auth.js always answers with a redirect or an error; reaching here would be a bug in it.
	throw new Error('Auth.js sign-in returned without a redirect');
}

/**
 * Single sign-on: throws the redirect to the identity provider's login page, or resolves with
 * 'unavailable' when the provider cannot be reached (its discovery document is fetched first).
 */
export async function signInWithSsoForm(
	event: RequestEvent,
	providerId: string,
	next: string
): Promise<'unavailable'> {
	try {
		await signIn(withBody(event, { providerId, redirectTo: safeNext(next) }));
	} catch (error) {
		if (isRedirect(error)) redirect(303, error.location);
		if (error instanceof AuthError) {
			console.error('[auth] single sign-on unavailable:', error);
			return 'unavailable';
		}
		throw error;
	}
	throw new Error('Auth.js sign-in returned without a redirect');
}

export async function signOutForm(event: RequestEvent): Promise<never> {
	try {
		await signOut(withBody(event, { redirectTo: '/' }));
	} catch (error) {
		if (isRedirect(error)) redirect(303, '/signin?signedOut=1');
		throw error;
	}
	throw new Error('Auth.js sign-out returned without a redirect');
}
