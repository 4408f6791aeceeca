import { checkHealth } from '$lib/server/health/health';
import { forkEm } from '$lib/server/db/orm';
import { VERDICTS, type Verdict } from '$lib/compliance/judge';
import type { PageServerLoad } from './$types';

// Public: anonymous visitors see the product and the state of its services (what /api/health
// shows anyway); the verdict counts need a signed-in user.
export const load = (async ({ locals }) => {
	const health = await checkHealth();
	if (!locals.user || health.components.database.status === 'down') {
		return { health, signedIn: locals.user !== null, counts: null };
	}
	const rows = await (await forkEm())
		.getConnection()
		.execute<{ verdict: Verdict; n: number }[]>(
			'select verdict, count(*)::int as n from loop where archived_at is null group by verdict'
		);
	const counts = Object.fromEntries(VERDICTS.map((v) => [v, 0])) as Record<Verdict, number>;
	for (const r of rows) counts[r.verdict] = r.n;
	return { health, signedIn: true, counts };
}) satisfies PageServerLoad;
