import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/auth/guard';
import { atLeast } from '$lib/auth/roles';
import { forkEm } from '$lib/server/db/orm';
import { failForm } from '$lib/server/http/forms';
import { createLoop } from '$lib/server/registry/loops';
import { listProducts } from '$lib/server/registry/products';
import { listClasses } from '$lib/server/registry/classes';
import { listPeople } from '$lib/server/registry/people';
import { loopFormSchema, splitTags } from '$lib/registry/schemas';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const user = requireRole(event, 'engineer');
	const em = await forkEm();
	const all = { page: 1, pageSize: 200 };
	const lead = atLeast(user.role, 'lead');
	const initial = {
		product: event.url.searchParams.get('product') ?? '',
		class: event.url.searchParams.get('class') ?? '',
		owner: user.email
	};
	return {
		form: await superValidate(initial, zod4(loopFormSchema), { errors: false }),
		products: (await listProducts(em, all)).items,
		classes: (await listClasses(em, all)).items.map((c) => ({ key: c.key, name: c.name })),
		// Engineers register loops they own; leads may pick anyone.
		people: lead ? await listPeople(em, 'engineer') : [{ id: user.id, name: user.name, email: user.email, role: user.role }]
	};
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const user = requireRole(event, 'engineer');
		const form = await superValidate(event.request, zod4(loopFormSchema));
		if (!form.valid) return fail(400, { form });
		let id: string;
		try {
			id = (await createLoop(await forkEm(), user, { ...form.data, tags: splitTags(form.data.tags) })).id;
		} catch (e) {
			return failForm(form, e);
		}
		redirect(303, `/loops/${id}`);
	}
} satisfies Actions;
