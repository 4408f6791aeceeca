import { checkHealth } from '$lib/server/health/health';
import type { PageServerLoad } from './$types';

// Until the dashboard lands this page shows the state of the services behind the product; it is
// public like /api/health and reveals nothing more than it does.
export const load = (async ({ locals }) => {
	return { health: await checkHealth(), signedIn: locals.user !== null };
}) satisfies PageServerLoad;
