import { fail, redirect } from '@sveltejs/kit';
import { message, superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { tokenCreateSchema, tokenRevokeSchema } from '$lib/schemas/auth';
import { scopesForRole } from '$lib/auth/roles';
import { requireUser } from '$lib/server/auth/guard';
import { createToken, listTokens, revokeToken } from '$lib/server/auth/tokens';
import { forkEm } from '$lib/server/db/orm';
import { DomainError } from '$lib/server/errors';
import { domainFailure } from '$lib/server/http/action';
import type { Actions, PageServerLoad } from './$types';

/** What the page shows after a creation: the value, this once. */
export type TokenMessage = { created: true; name: string; value: string } | { created: false; text: string };

export const load = (async (event) => {
	const user = requireUser(event);
	return {
		tokens: await listTokens(await forkEm(), user.id),
		allowedScopes: scopesForRole(user.role),
		form: await superValidate(zod4(tokenCreateSchema))
	};
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const user = requireUser(event);
		const form = await superValidate<Infer<typeof tokenCreateSchema>, TokenMessage>(
			event.request,
			zod4(tokenCreateSchema)
		);
		if (!form.valid) return fail(400, { form });
		try {
			const { value } = await createToken(await forkEm(), user, form.data);
			// No redirect here: the value exists only in this answer and is never stored.
			return message(form, { created: true, name: form.data.name, value });
		} catch (error) {
			if (error instanceof DomainError) return message(form, { created: false, text: error.message }, { status: 403 });
			throw error;
		}
	},
	revoke: async (event) => {
		const user = requireUser(event);
		const parsed = tokenRevokeSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { problem: 'Choose a token.' });
		try {
			await revokeToken(await forkEm(), user.id, parsed.data.tokenId);
		} catch (error) {
			return domainFailure(error);
		}
		redirect(303, '/settings/tokens');
	}
} satisfies Actions;
