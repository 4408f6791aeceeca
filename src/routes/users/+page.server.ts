import { fail, redirect, type RequestEvent } from '@sveltejs/kit';
import { message, setError, superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { inviteSchema, roleChangeSchema, userIdSchema } from '$lib/schemas/auth';
import { requireRole } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { Conflict, DomainError } from '$lib/server/errors';
import { domainFailure } from '$lib/server/http/action';
import { changeRole, inviteUser, listUsers, resendInvitation, setActive } from '$lib/server/users/users';
import { ROLES } from '$lib/auth/roles';
import type { Actions, PageServerLoad } from './$types';

export type InviteMessage = { tone: 'success' | 'problem'; text: string };

/** The row buttons post plain fields; zod checks them here like any other input. */
async function rowInput<T>(event: RequestEvent, schema: { safeParse(v: unknown): { success: true; data: T } | { success: false } }) {
	const parsed = schema.safeParse(Object.fromEntries(await event.request.formData()));
	return parsed.success ? parsed.data : null;
}

export const load = (async (event) => {
	const admin = requireRole(event, 'admin');
	return {
		users: await listUsers(await forkEm()),
		invite: await superValidate(zod4(inviteSchema)),
		roles: ROLES,
		me: admin.id
	};
}) satisfies PageServerLoad;

export const actions = {
	invite: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate<Infer<typeof inviteSchema>, InviteMessage>(event.request, zod4(inviteSchema));
		if (!form.valid) return fail(400, { form });
		try {
			const { user, mailed } = await inviteUser(await forkEm(), admin.id, form.data);
			// No redirect: the admin should see at once whether the e-mail went out.
			return message(
				form,
				mailed
					? { tone: 'success', text: `Invitation sent to ${user.email}.` }
					: { tone: 'problem', text: `${user.email} is invited, but the e-mail could not be sent: use “Send again” once mail works.` }
			);
		} catch (error) {
			if (error instanceof Conflict && error.path === 'email') return setError(form, 'email', error.message, { status: 409 });
			if (error instanceof DomainError) return message(form, { tone: 'problem', text: error.message }, { status: 400 });
			throw error;
		}
	},
	role: async (event) => {
		const admin = requireRole(event, 'admin');
		const input = await rowInput(event, roleChangeSchema);
		if (!input) return fail(400, { problem: 'Choose a user and a role.' });
		try {
			await changeRole(await forkEm(), admin.id, input.userId, input.role);
		} catch (error) {
			return domainFailure(error, { userId: input.userId });
		}
		redirect(303, '/users');
	},
	deactivate: async (event) => {
		const admin = requireRole(event, 'admin');
		const input = await rowInput(event, userIdSchema);
		if (!input) return fail(400, { problem: 'Choose a user.' });
		try {
			await setActive(await forkEm(), admin.id, input.userId, false);
		} catch (error) {
			return domainFailure(error, { userId: input.userId });
		}
		redirect(303, '/users');
	},
	reactivate: async (event) => {
		const admin = requireRole(event, 'admin');
		const input = await rowInput(event, userIdSchema);
		if (!input) return fail(400, { problem: 'Choose a user.' });
		try {
			await setActive(await forkEm(), admin.id, input.userId, true);
		} catch (error) {
			return domainFailure(error, { userId: input.userId });
		}
		redirect(303, '/users');
	},
	resend: async (event) => {
		const admin = requireRole(event, 'admin');
		const input = await rowInput(event, userIdSchema);
		if (!input) return fail(400, { problem: 'Choose a user.' });
		try {
			const mailed = await resendInvitation(await forkEm(), admin.id, input.userId);
			if (!mailed) return fail(503, { userId: input.userId, problem: 'The e-mail could not be sent; try again later.' });
		} catch (error) {
			return domainFailure(error, { userId: input.userId });
		}
		redirect(303, '/users');
	}
} satisfies Actions;
