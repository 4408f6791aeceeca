import { fail, redirect } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { signInSchema } from '$lib/schemas/auth';
import { signInWithPasswordForm, signInWithSsoForm } from '$lib/server/auth/actions';
import { safeNext } from '$lib/server/auth/next';
import { OIDC_PROVIDER_ID, ssoName } from '$lib/server/auth/authjs';
import type { Actions, PageServerLoad } from './$types';

// Public by nature: this is where anonymous people go. It reveals only whether SSO is offered.

// One answer for unknown address, wrong password, no password yet and deactivated account.
const INVALID = 'That e-mail and password do not match an active account.';
const LIMITED = 'Too many sign-in attempts. Wait a few minutes, then try again.';

/** Words for what Auth.js or our own pages put in the query string on the way back here. */
function notice(params: URLSearchParams): { tone: 'info' | 'success' | 'problem'; text: string } | null {
	const error = params.get('error');
	if (error === 'AccessDenied') {
		return { tone: 'problem', text: 'Single sign-on worked, but that account may not use Headroom (deactivated, or its e-mail address is not verified). Ask an admin.' };
	}
	if (error === 'CredentialsSignin') return { tone: 'problem', text: params.get('code') === 'rate_limited' ? LIMITED : INVALID };
	if (error) return { tone: 'problem', text: 'Signing in did not work. Try again; if it keeps failing, tell an admin.' };
	if (params.has('signedOut')) return { tone: 'info', text: 'You are signed out.' };
	if (params.has('passwordSet')) return { tone: 'success', text: 'Your password is set. Sign in with it.' };
	return null;
}

export const load = (async ({ url, locals }) => {
	const next = safeNext(url.searchParams.get('next'));
	if (locals.user) redirect(303, next);
	const form = await superValidate({ next }, zod4(signInSchema), { errors: false });
	return { form, next, sso: ssoName() ?? null, notice: notice(url.searchParams) };
}) satisfies PageServerLoad;

export const actions = {
	password: async (event) => {
		const form = await superValidate(event.request, zod4(signInSchema));
		// Whatever happens, the password does not travel back to the browser.
		const password = form.data.password;
		form.data.password = '';
		if (!form.valid) return fail(400, { form });
		const refusal = await signInWithPasswordForm(event, { ...form.data, password });
		return message(form, refusal === 'rate_limited' ? LIMITED : INVALID, {
			status: refusal === 'rate_limited' ? 429 : 400
		});
	},
	sso: async (event) => {
		if (!ssoName()) return fail(404, { ssoProblem: 'Single sign-on is not set up here.' });
		const next = String((await event.request.formData()).get('next') ?? '/');
		await signInWithSsoForm(event, OIDC_PROVIDER_ID, next);
		return fail(503, { ssoProblem: 'Single sign-on is unavailable right now. Try again shortly.' });
	}
} satisfies Actions;
