import { json } from '@sveltejs/kit';
import { api } from '$lib/server/http/respond';
import { requireScope } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { Invalid } from '$lib/server/errors';
import { compareRevisions, loopHistory, revisionNumber } from '$lib/server/revisions/history';
import type { RequestHandler } from './$types';

/**
 * Every revision (oldest first) with its worst-case margins and verdict, and the class's
 * requirement versions; with `?a=3&b=5`, also what changed from revision 3 to revision 5.
 */
export const GET = (async (event) =>
	api(async () => {
		requireScope(event, 'read');
		const params = event.url.searchParams;
		const a = revisionNumber(params.get('a'), 'a');
		const b = revisionNumber(params.get('b'), 'b');
		if ((a === undefined) !== (b === undefined))
			throw new Invalid('Give both a and b to compare two revisions.', a === undefined ? 'a' : 'b');
		if (a !== undefined && a === b)
			throw new Invalid('a and b must be two different revisions.', 'b');
		const em = await forkEm();
		const history = await loopHistory(em, event.params.id);
		const comparison =
			a !== undefined && b !== undefined ? await compareRevisions(em, event.params.id, a, b) : null;
		return json({ ...history, comparison });
	})) satisfies RequestHandler;
