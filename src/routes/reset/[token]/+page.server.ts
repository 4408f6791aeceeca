import { fail, redirect } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { setPasswordSchema } from '$lib/schemas/auth';
import { signInWithPasswordForm } from '$lib/server/auth/actions';
import { findUsableLink } from '$lib/server/auth/links';
import { setPasswordWithLink } from '$lib/server/auth/password-reset';
import { forkEm } from '$lib/server/db/orm';
import { Invalid } from '$lib/server/errors';
import type { Actions, PageServerLoad } from './$types';

// Public: the link in the e-mail is the credential. Opening the page does not use it up (mail
// scanners open links); only setting the password does.

export const load = (async ({ params }) => {
	const link = await findUsableLink(await forkEm(), params.token);
	return {
		link: link && { purpose: link.purpose, email: link.user.email, name: link.user.name },
		form: await superValidate(zod4(setPasswordSchema))
	};
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const form = await superValidate(event.request, zod4(setPasswordSchema));
		const password = form.data.password;
		form.data.password = '';
		form.data.confirm = '';
		if (!form.valid) return fail(400, { form });
		let email: string;
		try {
			({ email } = await setPasswordWithLink(await forkEm(), event.params.token, password));
		} catch (error) {
			if (error instanceof Invalid) return message(form, error.message, { status: 400 });
			throw error;
		}
		// Straight in with the new password; should that be refused (rate limit), sign in by hand.
		await signInWithPasswordForm(event, { email, password, next: '/' });
		redirect(303, '/signin?passwordSet=1');
	}
} satisfies Actions;
