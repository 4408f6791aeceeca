import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { resetRequestSchema } from '$lib/schemas/auth';
import { requestPasswordReset } from '$lib/server/auth/password-reset';
import { forkEm } from '$lib/server/db/orm';
import type { Actions, PageServerLoad } from './$types';

// Public: people who cannot sign in come here. It answers the same for every address.

const ANSWER =
	'If that address belongs to an account, a link to choose a new password is on its way. It works once, for an hour.';

export const load = (async () => {
	return { form: await superValidate(zod4(resetRequestSchema)) };
}) satisfies PageServerLoad;

export const actions = {
	default: async ({ request }) => {
		const form = await superValidate(request, zod4(resetRequestSchema));
		if (!form.valid) return fail(400, { form });
		// Not awaited: looking the address up and sending mail take time only for known
		// addresses, and the answer must not show which ones those are.
		const email = form.data.email;
		void forkEm()
			.then((em) => requestPasswordReset(em, email))
			.catch((error) => console.error('password reset mail failed:', error));
		return message(form, ANSWER);
	}
} satisfies Actions;
