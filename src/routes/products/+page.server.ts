import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole, requireUser } from '$lib/server/auth/guard';
import { atLeast } from '$lib/auth/roles';
import { forkEm } from '$lib/server/db/orm';
import { failForm } from '$lib/server/http/forms';
import { createProduct, listProducts } from '$lib/server/registry/products';
import { productSchema } from '$lib/registry/schemas';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const user = requireUser(event);
	return {
		products: (await listProducts(await forkEm(), { page: 1, pageSize: 200 })).items,
		canCreate: atLeast(user.role, 'lead'),
		form: await superValidate(zod4(productSchema))
	};
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const user = requireRole(event, 'lead');
		const form = await superValidate(event.request, zod4(productSchema));
		if (!form.valid) return fail(400, { form });
		try {
			await createProduct(await forkEm(), user, form.data);
		} catch (e) {
			return failForm(form, e);
		}
		redirect(303, `/?product=${encodeURIComponent(form.data.key)}`);
	}
} satisfies Actions;
