import { fail, redirect } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { DomainError } from '$lib/server/errors';
import { IMPORT_COLUMNS, MAX_IMPORT_BYTES, commitImport, previewImport } from '$lib/server/registry/loop-import';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	requireRole(event, 'engineer');
	return { columns: IMPORT_COLUMNS, maxBytes: MAX_IMPORT_BYTES };
}) satisfies PageServerLoad;

/** The CSV from the file input, or (after a preview) from the hidden field that carries it on. */
async function csvFrom(request: Request): Promise<string> {
	const data = await request.formData();
	const file = data.get('file');
	if (file instanceof File && file.size > 0) {
		if (file.size > MAX_IMPORT_BYTES) throw new DomainError('too_large', 'The file is over 1 MB; split it.', 'file');
		return file.text();
	}
	return String(data.get('csv') ?? '');
}

// A file upload with a preview step rather than a typed form, so it uses plain actions; the
// rules live in loop-import.ts and are the same ones a single create applies.
export const actions = {
	preview: async (event) => {
		const user = requireRole(event, 'engineer');
		try {
			const csv = await csvFrom(event.request);
			return { csv, preview: await previewImport(await forkEm(), user, csv) };
		} catch (e) {
			if (e instanceof DomainError) return fail(e.code === 'too_large' ? 413 : 400, { error: e.message });
			throw e;
		}
	},
	commit: async (event) => {
		const user = requireRole(event, 'engineer');
		const csv = await csvFrom(event.request);
		let created: number;
		try {
			created = (await commitImport(await forkEm(), user, csv)).created;
		} catch (e) {
			if (e instanceof DomainError) return fail(400, { csv, error: e.message, preview: await previewImport(await forkEm(), user, csv).catch(() => undefined) });
			throw e;
		}
		redirect(303, `/?sort=updatedAt&dir=desc&imported=${created}`);
	}
} satisfies Actions;
