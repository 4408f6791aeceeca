/**
 * The role × route matrix, generated from src/routes and run against the built app over HTTP.
 * Every page, form action and API method has a line in NEEDS below (the least role that may use
 * it, and for the API the token scope). The test asks each route as an anonymous caller, as each
 * demo role's session, and through API tokens with and without the upload scope, and checks the
 * gate: refused below the line (pages: 303 to /signin or 403; API: 401/403 in the JSON contract),
 * let through at or above it. A route added without a line here fails the first test — decide
 * who may use it, then add the line. Parameters are filled with ids that name nothing, and bodies
 * are empty, so a caller let through gets a 4xx from validation or lookup and nothing changes.
 *
 * Related checks that live elsewhere (not repeated here): deactivation cutting sessions and tokens
 * at once, role changes narrowing tokens (tests/integration/auth/tokens-and-roles.test.ts); cookie
 * flags, sign-in CSRF (auth/password-sign-in.test.ts); Secure cookies over https, rate limiting
 * and no account enumeration (auth/hardening.test.ts, auth/invitation-and-reset.test.ts); every
 * handler calling a guard in its own code (tests/unit/security/route-guards.test.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BUILD_TIMEOUT_MS, startBuiltApp, type BuiltApp } from '../support/built-app';
import { HttpClient } from '../support/http-client';
import { testEnv } from '../support/env';
import { concretePath, routeTree, type Entry } from './route-tree';
import { apiUpload, DEMO_ROLES, demoSessions, trustAppEnv, type DemoRole } from './support';

type Who = 'anonymous' | DemoRole;
type Scope = 'read' | 'upload' | 'none';
/** [least role, scope an API token needs]; 'secret': the store's shared secret, no user at all. */
type Need = Who | 'secret' | [Who, Scope];

const NEEDS: Record<string, Need> = {
	// Pages and their form actions.
	'GET /': 'anonymous',
	'GET /audit': 'viewer',
	'GET /classes': 'viewer',
	'POST /classes?/create': 'lead',
	'GET /classes/[key]': 'viewer',
	'POST /classes/[key]?/targets': 'lead',
	'POST /classes/[key]?/update': 'lead',
	'GET /loops': 'viewer',
	'GET /loops/[id]': 'viewer',
	'GET /loops/[id]/history': 'viewer',
	'POST /loops/[id]?/update': 'engineer',
	'POST /loops/[id]?/archive': 'engineer',
	'POST /loops/[id]?/restore': 'engineer',
	'POST /loops/[id]?/grant': 'lead',
	'POST /loops/[id]?/revoke': 'lead',
	'GET /loops/import': 'engineer',
	'POST /loops/import?/preview': 'engineer',
	'POST /loops/import?/commit': 'engineer',
	'GET /loops/new': 'engineer',
	'POST /loops/new': 'engineer',
	'GET /products': 'viewer',
	'POST /products?/create': 'lead',
	'GET /reports': 'viewer',
	'POST /reports?/create': 'viewer',
	'GET /reset': 'anonymous',
	'POST /reset': 'anonymous',
	'GET /reset/[token]': 'anonymous',
	'POST /reset/[token]': 'anonymous',
	'GET /settings/tokens': 'viewer',
	'POST /settings/tokens?/create': 'viewer',
	'POST /settings/tokens?/revoke': 'viewer',
	'GET /settings/notifications': 'viewer',
	'POST /settings/notifications': 'lead',
	'GET /signin': 'anonymous',
	'POST /signin?/password': 'anonymous',
	'POST /signin?/sso': 'anonymous',
	'GET /signout': 'anonymous',
	'POST /signout': 'anonymous',
	'GET /users': 'admin',
	'POST /users?/invite': 'admin',
	'POST /users?/role': 'admin',
	'POST /users?/deactivate': 'admin',
	'POST /users?/reactivate': 'admin',
	'POST /users?/resend': 'admin',
	// The JSON API.
	'GET /api/classes': ['viewer', 'read'],
	'POST /api/classes': ['lead', 'upload'],
	'GET /api/classes/[key]/requirement': ['viewer', 'read'],
	'PUT /api/classes/[key]/requirement': ['lead', 'upload'],
	'GET /api/classes/[key]/requirement/history': ['viewer', 'read'],
	'DELETE /api/deviations/[id]': ['lead', 'upload'],
	'GET /api/health': 'anonymous',
	'GET /api/loops': ['viewer', 'read'],
	'POST /api/loops': ['engineer', 'upload'],
	'GET /api/loops/export.csv': ['viewer', 'read'],
	'GET /api/loops/summary': ['viewer', 'read'],
	'GET /api/loops/[id]': ['viewer', 'read'],
	'PATCH /api/loops/[id]': ['engineer', 'upload'],
	'GET /api/loops/[id]/history': ['viewer', 'read'],
	'POST /api/loops/[id]/deviations': ['lead', 'upload'],
	'GET /api/loops/[id]/revisions': ['viewer', 'read'],
	'POST /api/loops/[id]/revisions': ['engineer', 'upload'],
	'POST /api/loops/[id]/revisions/upload-url': ['engineer', 'upload'],
	'GET /api/me': ['viewer', 'none'],
	'GET /api/products': ['viewer', 'read'],
	'POST /api/products': ['lead', 'upload'],
	'GET /api/reports': ['viewer', 'read'],
	'POST /api/reports': ['viewer', 'read'],
	'GET /api/reports/[id]': ['viewer', 'read'],
	'GET /api/reports/[id]/file': ['viewer', 'read'],
	'GET /api/revisions/[id]': ['viewer', 'read'],
	'GET /api/revisions/[id]/model': ['viewer', 'read'],
	'POST /api/revisions/[id]/complete': ['engineer', 'upload'],
	'POST /api/storage-events': 'secret'
};

const ORDER: Who[] = ['anonymous', ...DEMO_ROLES];
const atLeast = (who: Who, need: Who) => ORDER.indexOf(who) >= ORDER.indexOf(need);

interface Caller {
	label: string;
	who: Who;
	/** Scopes of the credential; sessions carry every scope of their role. */
	scopes: Scope[];
	client?: HttpClient;
	token?: string;
}

let app: BuiltApp;
let callers: Caller[] = [];
const tree = routeTree();

async function createToken(client: HttpClient, name: string, scopes: string[]): Promise<string> {
	const response = await client.post('/settings/tokens?/create', { name, scopes });
	const value = /data-testid="new-token-value"[^>]*>(hr_[\w-]+)</.exec(await response.text())?.[1];
	if (!value) throw new Error(`no token created for ${name} (HTTP ${response.status})`);
	return value;
}

beforeAll(async () => {
	app = await startBuiltApp({ prefix: 'trust_matrix', seed: true, env: trustAppEnv });
	const sessions = await demoSessions(app.url);
	const roleScopes = (role: DemoRole): Scope[] => (role === 'viewer' ? ['read'] : ['read', 'upload']);
	callers = [
		{ label: 'anonymous', who: 'anonymous', scopes: [], client: new HttpClient(app.url) },
		...DEMO_ROLES.map((role) => ({ label: `${role} session`, who: role, scopes: roleScopes(role), client: sessions[role] })),
		...DEMO_ROLES.map((role) => ({ label: `${role} token (${roleScopes(role).join('+')})`, who: role, scopes: roleScopes(role), token: `hr_demo_${role}` })),
		{ label: 'engineer token (read only)', who: 'engineer', scopes: ['read'], token: await createToken(sessions.engineer, 'read only', ['read']) },
		{ label: 'lead token (read only)', who: 'lead', scopes: ['read'], token: await createToken(sessions.lead, 'read only', ['read']) },
		{ label: 'admin token (read only)', who: 'admin', scopes: ['read'], token: await createToken(sessions.admin, 'read only', ['read']) }
	];
}, BUILD_TIMEOUT_MS);
afterAll(async () => {
	await app?.stop();
});

/** Asks one route as one caller; returns what came back. */
async function ask(entry: Entry, caller: Caller, extraHeaders: Record<string, string> = {}) {
	const path = concretePath(entry);
	const client = caller.client ?? new HttpClient(app.url);
	const headers: Record<string, string> = { ...extraHeaders };
	if (caller.token) headers.authorization = `Bearer ${caller.token}`;
	if (entry.kind === 'endpoint') {
		headers.accept = 'application/json';
		const init: RequestInit = { method: entry.method, headers };
		if (entry.method !== 'GET') {
			headers['content-type'] = 'application/json';
			headers.origin = app.url;
			init.body = '{}';
		}
		return client.request(path, { ...init, signal: AbortSignal.timeout(15_000) });
	}
	if (entry.kind === 'action') return client.post(path, {}, { headers, signal: AbortSignal.timeout(15_000) });
	return client.request(path, { headers, signal: AbortSignal.timeout(15_000) });
}

function verdictOf(status: number, location: string | null): 'signin' | 'refused' | 'through' {
	if (status === 401) return 'signin';
	if (status === 303 && location?.startsWith('/signin?next=')) return 'signin';
	if (status === 403) return 'refused';
	return 'through';
}

describe('the role × route matrix', () => {
	it('has a line for every page, action and API method in src/routes, and none for routes that are gone', () => {
		const found = tree.map((e) => e.key);
		expect(found.length).toBeGreaterThan(40);
		const missing = found.filter((k) => !(k in NEEDS));
		const stale = Object.keys(NEEDS).filter((k) => !found.includes(k));
		expect(missing, 'routes without a line in NEEDS: decide who may use them').toEqual([]);
		expect(stale, 'lines in NEEDS for routes that no longer exist').toEqual([]);
	});

	it('lets each caller through exactly where its role and scope allow, and refuses everywhere else', async () => {
		const wrong: string[] = [];
		let asked = 0;
		for (const entry of tree) {
			const need = NEEDS[entry.key];
			if (need === undefined) continue; // reported by the test above
			for (const caller of callers) {
				const isApi = entry.kind === 'endpoint';
				if (!isApi && caller.token) continue; // tokens are checked against pages below
				// Public actions (sign out, sign in, reset) are only asked anonymously: a session
				// posting /signout would end itself.
				if (need === 'anonymous' && entry.method !== 'GET' && caller.who !== 'anonymous') continue;
				let expected: 'signin' | 'refused' | 'through';
				if (need === 'secret') expected = 'signin';
				else if (need === 'anonymous') expected = 'through';
				else {
					const [role, scope] = Array.isArray(need) ? need : [need, 'none' as Scope];
					if (caller.who === 'anonymous') expected = 'signin';
					else if (!atLeast(caller.who, role)) expected = 'refused';
					else if (isApi && scope !== 'none' && !caller.scopes.includes(scope)) expected = 'refused';
					else expected = 'through';
				}
				const response = await ask(entry, caller);
				asked++;
				const got = verdictOf(response.status, response.headers.get('location'));
				const body = await response.text();
				if (got !== expected) wrong.push(`${entry.key} as ${caller.label}: expected ${expected}, got HTTP ${response.status} ${response.headers.get('location') ?? ''} ${body.slice(0, 120)}`);
				else if (response.status >= 500) wrong.push(`${entry.key} as ${caller.label}: HTTP ${response.status} ${body.slice(0, 200)}`);
				else if (isApi && got !== 'through') {
					// Refusals from the API are in the contract shape, in words.
					const parsed = JSON.parse(body) as { error?: { code?: string; message?: string } };
					if (!parsed.error?.message || !['unauthenticated', 'forbidden'].includes(parsed.error.code ?? '')) {
						wrong.push(`${entry.key} as ${caller.label}: refusal not in the contract shape: ${body.slice(0, 200)}`);
					}
				}
			}
		}
		expect(wrong).toEqual([]);
		expect(asked).toBeGreaterThan(300);
	}, 300_000);

	it('never lets an API token open a page: pages know sessions only', async () => {
		const wrong: string[] = [];
		for (const entry of tree.filter((e) => e.kind === 'page' && NEEDS[e.key] !== 'anonymous')) {
			const response = await ask(entry, { label: 'admin token', who: 'admin', scopes: ['read', 'upload'], token: 'hr_demo_admin' });
			if (verdictOf(response.status, response.headers.get('location')) !== 'signin') wrong.push(`${entry.key}: HTTP ${response.status}`);
			await response.body?.cancel();
		}
		expect(wrong).toEqual([]);
	});

	it('takes store events only with the shared secret', async () => {
		const body = JSON.stringify({ Records: [] });
		const headers = { 'content-type': 'application/json' };
		const wrong = await fetch(`${app.url}/api/storage-events`, { method: 'POST', headers: { ...headers, 'x-headroom-storage-secret': 'guess' }, body });
		expect(wrong.status).toBe(401);
		const right = await fetch(`${app.url}/api/storage-events`, { method: 'POST', headers: { ...headers, 'x-headroom-storage-secret': testEnv.storageEventsSecret }, body });
		expect(right.status).toBe(200);
		expect(await right.json()).toEqual({ received: 0, outcomes: [] });
	});
});

describe('uploads by engineers who do not own the loop', () => {
	const model = (gain: number) => JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'polynomial', numerator: [gain], denominator: [1, 3, 3, 1] }] });
	const sql = <T>(q: string, p: unknown[] = []) => app.orm.em.getConnection().execute<T[]>(q, p);
	const revisions = async (loopId: string) => (await sql<{ n: number }>('select count(*)::int as n from revision where loop_id = ?', [loopId]))[0].n;

	async function loopWhere(openUploads: boolean, ownedByEngineer: boolean) {
		const [row] = await sql<{ id: string }>(
			`select l.id from loop l join loop_class c on c.id = l.loop_class_id join app_user u on u.id = l.owner_id
			 where c.open_uploads = ? and (u.email = 'engineer@headroom.test') = ? and l.archived_at is null limit 1`,
			[openUploads, ownedByEngineer]
		);
		if (!row) throw new Error(`the demo data has no loop with openUploads=${openUploads}, owned by the engineer=${ownedByEngineer}`);
		return row.id;
	}

	it('refuses an engineer on someone else’s loop, through the API and the presign route, storing nothing', async () => {
		const loopId = await loopWhere(false, false);
		const before = await revisions(loopId);
		const direct = await apiUpload(app.url, loopId, 'hr_demo_engineer', model(0.5 + Math.random()), 'not-mine.json');
		expect(direct.status).toBe(403);
		expect(direct.json.error?.message).toMatch(/owner/);
		const presign = await fetch(`${app.url}/api/loops/${loopId}/revisions/upload-url`, {
			method: 'POST',
			headers: { authorization: 'Bearer hr_demo_engineer', 'content-type': 'application/json' },
			body: JSON.stringify({ fileName: 'not-mine.json' })
		});
		expect(presign.status).toBe(403);
		expect(await revisions(loopId)).toBe(before);
	});

	it('lets the same engineer upload where the class is open to every engineer, and leads anywhere', async () => {
		const open = await loopWhere(true, false);
		const before = await revisions(open);
		const byEngineer = await apiUpload(app.url, open, 'hr_demo_engineer', model(0.5 + Math.random()), 'open-class.json');
		expect(byEngineer.status, byEngineer.body).toBe(202);
		const closed = await loopWhere(false, false);
		const byLead = await apiUpload(app.url, closed, 'hr_demo_lead', model(0.5 + Math.random()), 'by-lead.json');
		expect(byLead.status, byLead.body).toBe(202);
		expect(await revisions(open)).toBe(before + 1);
		// A viewer never uploads, owner or not.
		const byViewer = await apiUpload(app.url, open, 'hr_demo_viewer', model(0.5 + Math.random()), 'viewer.json');
		expect(byViewer.status).toBe(403);
	});
});

describe('cross-site requests', () => {
	it('refuses a form action posted from another origin with a live session, and nothing is created', async () => {
		const lead = (await demoSessions(app.url)).lead;
		const key = `csrf-${Math.random().toString(36).slice(2, 8)}`;
		const response = await lead.post('/products?/create', { key, name: 'Forged product' }, { headers: { origin: 'http://evil.example' } });
		expect(response.status).toBe(403);
		expect(await response.text()).toMatch(/Cross-site/i);
		const rows = await app.orm.em.getConnection().execute('select 1 from product where key = ?', [key]);
		expect(rows).toHaveLength(0);
		// The same post from our own origin goes through, so the refusal above was the origin's doing.
		const ok = await lead.post('/products?/create', { key, name: 'Real product' });
		expect(ok.status).toBeLessThan(400);
		expect(await app.orm.em.getConnection().execute('select 1 from product where key = ?', [key])).toHaveLength(1);
	});

	it('refuses a cross-origin API write that rides on the session cookie (text/plain, no preflight)', async () => {
		const lead = (await demoSessions(app.url)).lead;
		const key = `xapi-${Math.random().toString(36).slice(2, 8)}`;
		const response = await lead.request('/api/products', {
			method: 'POST',
			headers: { origin: 'http://evil.example', 'content-type': 'text/plain', accept: 'application/json' },
			body: JSON.stringify({ key, name: 'Forged through the API' })
		});
		expect(response.status).toBe(403);
		expect(await app.orm.em.getConnection().execute('select 1 from product where key = ?', [key])).toHaveLength(0);
	});
});
