import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole, requireUser } from '$lib/server/auth/guard';
import { atLeast } from '$lib/auth/roles';
import { forkEm } from '$lib/server/db/orm';
import { failForm } from '$lib/server/http/forms';
import { getClass, updateClass } from '$lib/server/registry/classes';
import { compareVersions, requirementHistory, setRequirement } from '$lib/server/registry/requirements';
import { listPeople } from '$lib/server/registry/people';
import { classUpdateSchema, requirementSchema } from '$lib/registry/schemas';
import { TARGET_KEYS } from '$lib/registry/targets';
import { DomainError } from '$lib/server/errors';
import type { Actions, PageServerLoad } from './$types';

const version = (raw: string | null) => (raw && /^\d+$/.test(raw) ? Number(raw) : undefined);

export const load = (async (event) => {
	const user = requireUser(event);
	const em = await forkEm();
	const loopClass = await getClass(em, event.params.key).catch((e) => {
		if (e instanceof DomainError && e.code === 'not_found') error(404, e.message);
		throw e;
	});
	const history = (await requirementHistory(em, loopClass.key, { page: 1, pageSize: 200 })).items;
	const canEdit = atLeast(user.role, 'lead');
	// Compare the two versions asked for, or by default the one in force with the one before.
	const a = version(event.url.searchParams.get('a')) ?? history[1]?.version;
	const b = version(event.url.searchParams.get('b')) ?? history[0]?.version;
	const comparison = a && b && a !== b ? await compareVersions(em, loopClass.key, Math.min(a, b), Math.max(a, b)).catch(() => null) : null;
	const current = loopClass.requirement?.targets;
	const targetsForm = await superValidate(
		{ ...Object.fromEntries(TARGET_KEYS.map((k) => [k, current?.[k] ?? ''])), reason: '' },
		zod4(requirementSchema),
		{ errors: false, id: 'targets' }
	);
	const classForm = await superValidate(
		{ name: loopClass.name, description: loopClass.description, lead: loopClass.lead?.email ?? '', openUploads: loopClass.openUploads },
		zod4(classUpdateSchema),
		{ errors: false, id: 'class' }
	);
	return {
		loopClass,
		history,
		comparison,
		compare: { a: comparison?.a.version ?? a ?? null, b: comparison?.b.version ?? b ?? null },
		canEdit,
		leads: canEdit ? await listPeople(em, 'lead') : [],
		targetsForm,
		classForm
	};
}) satisfies PageServerLoad;

export const actions = {
	targets: async (event) => {
		const user = requireRole(event, 'lead');
		const data = await event.request.formData();
		const form = await superValidate(data, zod4(requirementSchema), { id: 'targets' });
		if (!form.valid) return fail(400, { form });
		const basedOn = version(String(data.get('basedOn') ?? ''));
		try {
			const saved = await setRequirement(await forkEm(), user, event.params.key, form.data, basedOn ?? 0);
			form.data.reason = '';
			return message(form, `Saved as version ${saved.version}.`);
		} catch (e) {
			return failForm(form, e);
		}
	},
	update: async (event) => {
		const user = requireRole(event, 'lead');
		const form = await superValidate(event.request, zod4(classUpdateSchema), { id: 'class' });
		if (!form.valid) return fail(400, { form });
		try {
			await updateClass(await forkEm(), user, event.params.key, form.data);
			return message(form, 'Class details saved.');
		} catch (e) {
			return failForm(form, e);
		}
	}
} satisfies Actions;
