import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole, requireUser } from '$lib/server/auth/guard';
import { atLeast } from '$lib/auth/roles';
import { forkEm } from '$lib/server/db/orm';
import { failForm } from '$lib/server/http/forms';
import { createClass, listClasses } from '$lib/server/registry/classes';
import { listPeople } from '$lib/server/registry/people';
import { classSchema } from '$lib/registry/schemas';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const user = requireUser(event);
	const em = await forkEm();
	const canCreate = atLeast(user.role, 'lead');
	return {
		classes: (await listClasses(em, { page: 1, pageSize: 200 })).items,
		canCreate,
		leads: canCreate ? await listPeople(em, 'lead') : [],
		form: await superValidate(zod4(classSchema))
	};
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const user = requireRole(event, 'lead');
		const form = await superValidate(event.request, zod4(classSchema));
		if (!form.valid) return fail(400, { form });
		try {
			await createClass(await forkEm(), user, form.data);
		} catch (e) {
			return failForm(form, e);
		}
		// Next step for a new class: its targets.
		redirect(303, `/classes/${encodeURIComponent(form.data.key)}#targets`);
	}
} satisfies Actions;
