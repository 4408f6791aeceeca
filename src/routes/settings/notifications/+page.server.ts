import { fail } from '@sveltejs/kit';
import { message, superValidate, type Infer } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { verdictMailSchema } from '$lib/schemas/notifications';
import { atLeast } from '$lib/auth/roles';
import { requireUser } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { DomainError } from '$lib/server/errors';
import { setVerdictMail, verdictMailSetting } from '$lib/server/verdicts/digest';
import { digestCron } from '$lib/server/config';
import type { Actions, PageServerLoad } from './$types';

export type NotificationMessage = { ok: boolean; text: string };

export const load = (async (event) => {
	const user = requireUser(event);
	const setting = await verdictMailSetting(await forkEm(), user.id);
	return {
		canChoose: atLeast(user.role, 'lead'),
		since: setting.since?.toISOString() ?? null,
		digestCron: digestCron(),
		form: await superValidate({ mode: setting.mode }, zod4(verdictMailSchema))
	};
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const user = requireUser(event);
		const form = await superValidate<Infer<typeof verdictMailSchema>, NotificationMessage>(event.request, zod4(verdictMailSchema));
		if (!form.valid) return fail(400, { form });
		try {
			const saved = await setVerdictMail(await forkEm(), user, form.data.mode);
			return message(form, {
				ok: true,
				text: saved.mode === 'digest' ? 'Saved: you get one digest a day.' : 'Saved: you get a message for every change.'
			});
		} catch (error) {
			if (error instanceof DomainError) return message(form, { ok: false, text: error.message }, { status: 403 });
			throw error;
		}
	}
} satisfies Actions;
