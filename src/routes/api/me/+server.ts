import { json } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { api } from '$lib/server/http/respond';
import type { RequestHandler } from './$types';

/** Who the caller is and what this request may do: handy for CLI users checking a token. */
export const GET = (async (event) =>
	api(async () => {
		const user = requireUser(event);
		return json(
			{ user, scopes: event.locals.scopes },
			{ headers: { 'cache-control': 'no-store' } }
		);
	})) satisfies RequestHandler;
