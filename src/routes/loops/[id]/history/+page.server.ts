import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { forkEm } from '$lib/server/db/orm';
import { DomainError } from '$lib/server/errors';
import { compareRevisions, loopHistory } from '$lib/server/revisions/history';
import type { PageServerLoad } from './$types';

const pick = (raw: string | null) => (raw && /^\d+$/.test(raw) ? Number(raw) : undefined);

export const load = (async (event) => {
	requireUser(event);
	const em = await forkEm();
	const history = await loopHistory(em, event.params.id).catch((e) => {
		if (e instanceof DomainError && e.code === 'not_found') error(404, 'No such loop.');
		throw e;
	});
	const numbers = history.revisions.map((r) => r.number);
	// By default the two latest computed revisions (or the two latest of any state).
	const computed = history.revisions.filter((r) => r.state === 'computed').map((r) => r.number);
	const defaults = computed.length >= 2 ? computed.slice(-2) : numbers.slice(-2);
	const asked = {
		a: pick(event.url.searchParams.get('a')),
		b: pick(event.url.searchParams.get('b'))
	};
	const a = asked.a ?? defaults[0];
	const b = asked.b ?? defaults[1];
	let problem: string | null = null;
	let comparison = null;
	if (numbers.length >= 2 && a !== undefined && b !== undefined) {
		if (!numbers.includes(a) || !numbers.includes(b))
			problem = `This loop has no revision ${numbers.includes(a) ? b : a}; pick one from the lists.`;
		else if (a === b) problem = 'Pick two different revisions to compare.';
		else comparison = await compareRevisions(em, history.loop.id, Math.min(a, b), Math.max(a, b));
	}
	return { history, selected: { a: a ?? null, b: b ?? null }, comparison, problem };
}) satisfies PageServerLoad;
