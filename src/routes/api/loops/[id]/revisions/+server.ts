import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireRole, requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { Invalid, TooLarge } from '$lib/server/errors';
import { MAX_MODEL_BYTES } from '$lib/margins';
import { uploadRevision } from '$lib/server/revisions/upload';
import { listRevisions } from '$lib/server/revisions/queries';
import { revisionView } from '$lib/server/revisions/views';
import type { RequestHandler } from './$types';

export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const items = await listRevisions(await forkEm(), event.params.id);
		return json({ items, total: items.length });
	})) satisfies RequestHandler;

/** Multipart upload: field `file` (JSON or CSV model), optional `note`. 202: computed by a job. */
export const POST = (async (event) =>
	api(async () => {
		const user = requireRole(event, 'engineer');
		requireScope(event, 'upload');
		const declared = Number(event.request.headers.get('content-length') ?? 0);
		// Refuse before reading the body: multipart framing adds little, so this is the file size.
		if (declared > MAX_MODEL_BYTES + 64 * 1024) {
			throw new TooLarge(`The upload is larger than the ${MAX_MODEL_BYTES / 1024 / 1024} MB limit; nothing was stored.`);
		}
		let form: FormData;
		try {
			form = await event.request.formData();
		} catch (error) {
			// A body without Content-Length is cut off by adapter-node at BODY_SIZE_LIMIT.
			const status = (error as { status?: number; cause?: { status?: number } }).status ?? (error as { cause?: { status?: number } }).cause?.status;
			if (status === 413 || /BODY_SIZE_LIMIT|exceed/i.test(String((error as Error)?.message ?? ''))) {
				throw new TooLarge(`The upload is larger than the ${MAX_MODEL_BYTES / 1024 / 1024} MB limit; nothing was stored.`);
			}
			throw new Invalid('Send the model as multipart/form-data with a field named "file".', 'file');
		}
		const file = form.get('file');
		if (!(file instanceof File)) throw new Invalid('The field "file" is missing or is not a file.', 'file');
		const note = form.get('note');
		const revision = await uploadRevision(await forkEm(), user, event.params.id, {
			fileName: file.name,
			bytes: new Uint8Array(await file.arrayBuffer()),
			note: typeof note === 'string' ? note : undefined
		});
		return json({ revision: revisionView(revision) }, { status: 202 });
	})) satisfies RequestHandler;
