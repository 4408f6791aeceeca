import { error, fail } from '@sveltejs/kit';
import { listRevisions } from '$lib/server/revisions/queries';
import { canUpload } from '$lib/server/revisions/upload';
import { LoopSchema } from '$lib/server/db/entities';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole, requireUser } from '$lib/server/auth/guard';
import { atLeast } from '$lib/auth/roles';
import { forkEm } from '$lib/server/db/orm';
import { DomainError } from '$lib/server/errors';
import { failForm } from '$lib/server/http/forms';
import { canEditLoop, getLoop, updateLoop, type LoopView } from '$lib/server/registry/loops';
import { grantDeviation, listDeviations, revokeDeviation } from '$lib/server/registry/deviations';
import { getClass, listClasses } from '$lib/server/registry/classes';
import { listProducts } from '$lib/server/registry/products';
import { listPeople } from '$lib/server/registry/people';
import { deviationFormSchema, loopEditSchema, splitTags, type DeviationForm } from '$lib/registry/schemas';
import { TARGET_FIELDS } from '$lib/registry/targets';
import type { Actions, PageServerLoad } from './$types';

async function loopOr404(id: string): Promise<LoopView> {
	try {
		return await getLoop(await forkEm(), id);
	} catch (e) {
		if (e instanceof DomainError && e.code === 'not_found') error(404, 'No such loop.');
		throw e;
	}
}

const editValues = (l: LoopView) => ({ product: l.product.key, class: l.class.key, key: l.key, name: l.name, owner: l.owner.email, tags: l.tags.join(', '), note: l.note });

async function mayUpload(em: Awaited<ReturnType<typeof forkEm>>, user: App.Locals['user'] & object, id: string) {
	const row = await em.findOne(LoopSchema, { id }, { populate: ['loopClass', 'owner'] });
	return !!row && !row.archivedAt && canUpload(user, row);
}

export const load = (async (event) => {
	const user = requireUser(event);
	const loop = await loopOr404(event.params.id);
	const em = await forkEm();
	const lead = atLeast(user.role, 'lead');
	const all = { page: 1, pageSize: 200 };
	const in90Days = new Date(Date.now() + 90 * 86_400_000).toISOString().slice(0, 10);
	// The stored judgement of the latest computed revision: the verdict per criterion.
	const judged = await em.findOne(LoopSchema, { id: loop.id }, { fields: ['verdictDetail', 'judgedRevisionId', 'judgedAt'] });
	return {
		loop,
		verdictDetail: judged?.verdictDetail ?? null,
		judgedRevisionId: judged?.judgedRevisionId ?? null,
		judgedAt: judged?.judgedAt?.toISOString() ?? null,
		deviations: await listDeviations(em, loop.id),
		requirement: (await getClass(em, loop.class.key)).requirement,
		canEdit: canEditLoop(user, loop),
		revisions: await listRevisions(em, loop.id),
		canUpload: await mayUpload(em, user, loop.id),
		isLead: lead,
		editForm: await superValidate(editValues(loop), zod4(loopEditSchema), { errors: false, id: 'edit' }),
		grantForm: await superValidate({ expiresOn: in90Days }, zod4(deviationFormSchema), { errors: false, id: 'grant' }),
		options: lead
			? {
					products: (await listProducts(em, all)).items.map((p) => ({ value: p.key, label: p.name })),
					classes: (await listClasses(em, all)).items.map((c) => ({ value: c.key, label: c.name })),
					people: (await listPeople(em, 'engineer')).map((p) => ({ value: p.email, label: `${p.name} (${p.email})` }))
				}
			: null
	};
}) satisfies PageServerLoad;

/** The deviation form's flat fields as the service's { criteria, relaxed } (null = waived). */
function deviationInput(f: DeviationForm) {
	const relaxed: Record<string, string | null> = {};
	for (const c of f.criteria) {
		for (const field of TARGET_FIELDS[c]) relaxed[field] = f.waived.includes(c) ? null : f[field] || null;
	}
	return {
		criteria: f.criteria,
		relaxed,
		reason: f.reason,
		startsAt: f.startsOn ? `${f.startsOn}T00:00:00Z` : undefined,
		expiresAt: `${f.expiresOn}T00:00:00Z`
	};
}

export const actions = {
	update: async (event) => {
		const user = requireRole(event, 'engineer');
		const form = await superValidate(event.request, zod4(loopEditSchema), { id: 'edit' });
		if (!form.valid) return fail(400, { form });
		const loop = await loopOr404(event.params.id);
		const now = editValues(loop);
		// Only what changed goes to the service: engineers may not send owner, product or class at all.
		const patch = Object.fromEntries(
			(Object.keys(now) as (keyof typeof now)[]).filter((k) => form.data[k] !== now[k]).map((k) => [k, k === 'tags' ? splitTags(form.data.tags) : form.data[k]])
		);
		if (!Object.keys(patch).length) return message(form, 'Nothing changed.');
		try {
			await updateLoop(await forkEm(), user, loop.id, patch);
			return message(form, 'Saved.');
		} catch (e) {
			return failForm(form, e);
		}
	},
	archive: async (event) => {
		const user = requireRole(event, 'engineer');
		await updateLoop(await forkEm(), user, event.params.id, { archived: true }).catch(toPage);
	},
	restore: async (event) => {
		const user = requireRole(event, 'engineer');
		await updateLoop(await forkEm(), user, event.params.id, { archived: false }).catch(toPage);
	},
	grant: async (event) => {
		const user = requireRole(event, 'lead');
		const form = await superValidate(event.request, zod4(deviationFormSchema), { id: 'grant' });
		if (!form.valid) return fail(400, { form });
		const missing = form.data.criteria.find((c) => !form.data.waived.includes(c) && TARGET_FIELDS[c].every((f) => !form.data[f]));
		if (missing) return setError(form, TARGET_FIELDS[missing][0], 'Enter the relaxed value, or tick “waive” to waive this criterion.');
		try {
			await grantDeviation(await forkEm(), user, event.params.id, deviationInput(form.data));
			return message(form, 'Deviation granted.');
		} catch (e) {
			return failForm(form, e);
		}
	},
	revoke: async (event) => {
		const user = requireRole(event, 'lead');
		const id = String((await event.request.formData()).get('deviation') ?? '');
		await revokeDeviation(await forkEm(), user, id).catch(toPage);
	}
} satisfies Actions;

/** Buttons without a form of their own: a refusal is shown as the action's error. */
function toPage(e: unknown): never {
	if (e instanceof DomainError) error(e.code === 'forbidden' ? 403 : e.code === 'not_found' ? 404 : 409, e.message);
	throw e;
}
