import { checkHealth } from '$lib/server/health/health';
import { forkEm } from '$lib/server/db/orm';
import { atLeast } from '$lib/auth/roles';
import { DomainError } from '$lib/server/errors';
import { pagingFrom } from '$lib/server/registry/common';
import { listLoops, loopFiltersFrom, type LoopFilters } from '$lib/server/registry/loops';
import { loopSummary } from '$lib/server/registry/loop-summary';
import { listProducts } from '$lib/server/registry/products';
import { listClasses } from '$lib/server/registry/classes';
import { listPeople } from '$lib/server/registry/people';
import { DASHBOARD_PAGE_SIZE } from '$lib/components/dashboard/dashboard-url';
import type { PageServerLoad } from './$types';

// Public: anonymous visitors see the product and the state of its services (what /api/health
// shows anyway); the dashboard needs a signed-in user. The first render comes from the URL on
// the server; later filter, sort and page changes are fetched by the page from /api/loops, so
// this load does not depend on the query string (untrack) and does not run again for them.
export const load = (async (event) => {
	const started = performance.now();
	const { locals, setHeaders } = event;
	const url = event.untrack(() => new URL(event.url));
	if (!locals.user) return { health: await checkHealth(), signedIn: false, dashboard: null };
	let filters: LoopFilters = {};
	let paging = { page: 1, pageSize: DASHBOARD_PAGE_SIZE };
	let problem: { message: string; path?: string } | null = null;
	try {
		filters = loopFiltersFrom(url.searchParams);
		paging = pagingFrom(url.searchParams, DASHBOARD_PAGE_SIZE);
	} catch (e) {
		if (!(e instanceof DomainError)) throw e;
		problem = { message: e.message, path: e.path };
	}
	const all = { page: 1, pageSize: 200 };
	const queries = async () => {
		const em = await forkEm();
		return Promise.all([
			// A refused filter lists nothing (as the API answers 400) rather than everything.
			problem ? { items: [], total: 0, ...paging } : listLoops(em.fork(), filters, paging),
			loopSummary(em.fork(), filters),
			listProducts(em.fork(), all),
			listClasses(em.fork(), all),
			listPeople(em.fork(), 'engineer')
		]);
	};
	const [health, result] = await Promise.all([checkHealth(), queries().catch((e: unknown) => ({ failed: e }))]);
	if ('failed' in result) {
		// The database is down: show the system panel rather than an error page.
		if (health.components.database.status === 'down') return { health, signedIn: true, dashboard: null };
		throw result.failed;
	}
	const [loops, summary, products, classes, people] = result;
	setHeaders({ 'server-timing': `dashboard;desc="dashboard load";dur=${(performance.now() - started).toFixed(1)}` });
	return {
		health,
		signedIn: true,
		dashboard: {
			search: url.search,
			loops,
			summary,
			problem,
			options: {
				products: products.items.map((p) => ({ key: p.key, name: p.name })),
				classes: classes.items.map((c) => ({ key: c.key, name: c.name })),
				people: people.map((p) => ({ email: p.email, name: p.name }))
			},
			canCreate: atLeast(locals.user.role, 'engineer')
		}
	};
}) satisfies PageServerLoad;
