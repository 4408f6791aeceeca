import { json } from '@sveltejs/kit';
import { checkHealth } from '$lib/server/health/health';
import type { RequestHandler } from './$types';

// Public by design: load balancers and the launcher call it without credentials. It reveals
// component states and the version, nothing about users or data.
export const GET = (async () => {
	const report = await checkHealth();
	return json(report, {
		status: report.status === 'up' ? 200 : 503,
		headers: { 'cache-control': 'no-store' }
	});
}) satisfies RequestHandler;
