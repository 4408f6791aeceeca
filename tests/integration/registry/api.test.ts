/**
 * Every registry API route, called through its real handler with the locals hooks.server.ts
 * would set: anonymous, each role, and a read-only API token. Checks status codes and bodies.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { basicScenario, setupRegistry, type Registry } from './support';
import { closeOrm } from '../../../src/lib/server/db/orm';
import type { Actor } from '../../../src/lib/server/registry/common';
import * as products from '../../../src/routes/api/products/+server';
import * as classes from '../../../src/routes/api/classes/+server';
import * as requirement from '../../../src/routes/api/classes/[key]/requirement/+server';
import * as history from '../../../src/routes/api/classes/[key]/requirement/history/+server';
import * as loops from '../../../src/routes/api/loops/+server';
import * as loop from '../../../src/routes/api/loops/[id]/+server';
import * as grant from '../../../src/routes/api/loops/[id]/deviations/+server';
import * as revoke from '../../../src/routes/api/deviations/[id]/+server';

let r: Registry;
let s: Awaited<ReturnType<typeof basicScenario>>;
const saved = process.env.DATABASE_URL;
beforeAll(async () => {
	r = await setupRegistry('reg_api');
	s = await basicScenario(r);
	process.env.DATABASE_URL = r.db.url;
});
afterAll(async () => {
	await closeOrm();
	process.env.DATABASE_URL = saved;
	await r?.close();
});

type Who = Actor | null | { token: Actor; scopes: ('read' | 'upload')[] };
type Handler = (event: never) => Promise<Response>;

async function call(handler: Handler, who: Who, path: string, params: Record<string, string> = {}, body?: unknown) {
	const url = new URL(`http://headroom.test${path}`);
	const method = body === undefined ? 'GET' : 'POST';
	const user = who && 'token' in who ? who.token : who;
	const scopes = who && 'token' in who ? who.scopes : user?.role === 'viewer' ? ['read'] : ['read', 'upload'];
	const request = new Request(url, body === undefined ? { method } : { method, body: typeof body === 'string' ? body : JSON.stringify(body), headers: { 'content-type': 'application/json' } });
	const response = await handler({ url, request, params, locals: { user, scopes: user ? scopes : [], requestId: 't' } } as never);
	const text = await response.text();
	return { status: response.status, body: text ? JSON.parse(text) : null };
}

describe('registry API', () => {
	it('answers anonymous callers 401 on every route, with the error body', async () => {
		const routes: [Handler, string, Record<string, string>, unknown?][] = [
			[products.GET, '/api/products', {}],
			[products.POST, '/api/products', {}, {}],
			[classes.GET, '/api/classes', {}],
			[classes.POST, '/api/classes', {}, {}],
			[requirement.GET, '/api/classes/speed/requirement', { key: 'speed' }],
			[requirement.PUT, '/api/classes/speed/requirement', { key: 'speed' }, {}],
			[history.GET, '/api/classes/speed/requirement/history', { key: 'speed' }],
			[loops.GET, '/api/loops', {}],
			[loops.POST, '/api/loops', {}, {}],
			[loop.GET, `/api/loops/${s.loop.id}`, { id: s.loop.id }],
			[loop.PATCH, `/api/loops/${s.loop.id}`, { id: s.loop.id }, {}],
			[grant.POST, `/api/loops/${s.loop.id}/deviations`, { id: s.loop.id }, {}],
			[revoke.DELETE, '/api/deviations/x', { id: 'x' }]
		];
		for (const [handler, path, params, body] of routes) {
			const res = await call(handler, null, path, params, body);
			expect(res.status, path).toBe(401);
			expect(res.body.error.code).toBe('unauthenticated');
		}
	});

	it('lets viewers read every list and record', async () => {
		const v = r.users.viewer;
		const list = await call(loops.GET, v, '/api/loops?page=1&pageSize=10');
		expect(list.status).toBe(200);
		expect(list.body).toMatchObject({ total: 1, page: 1, pageSize: 10 });
		expect(list.body.items[0]).toMatchObject({ id: s.loop.id, key: 'ax1-speed', product: { key: 'drive' }, class: { key: 'speed' }, owner: { email: r.users.engineer.email }, verdict: 'empty' });
		expect((await call(products.GET, v, '/api/products')).body.total).toBe(1);
		expect((await call(classes.GET, v, '/api/classes')).body.items[0].requirement.targets.minPhaseMarginDeg).toBe('45');
		expect((await call(requirement.GET, v, '/api/classes/speed/requirement', { key: 'speed' })).body.version).toBe(1);
		expect((await call(history.GET, v, '/api/classes/speed/requirement/history', { key: 'speed' })).body.total).toBe(1);
		const one = await call(loop.GET, v, `/api/loops/${s.loop.id}`, { id: s.loop.id });
		expect(one.body).toMatchObject({ id: s.loop.id, deviations: [] });
		expect((await call(loop.GET, v, '/api/loops/nope', { id: 'nope' })).status).toBe(404);
		expect((await call(requirement.GET, v, '/api/classes/zzz/requirement', { key: 'zzz' })).status).toBe(404);
	});

	it('refuses writes to roles below the one each route needs (403)', async () => {
		const { viewer, engineer, engineer2 } = r.users;
		const cases: [Handler, Actor, string, Record<string, string>, unknown][] = [
			[products.POST, engineer, '/api/products', {}, { key: 'p2', name: 'P2' }],
			[classes.POST, engineer, '/api/classes', {}, { key: 'c2', name: 'C2' }],
			[requirement.PUT, engineer, '/api/classes/speed/requirement', { key: 'speed' }, { minPhaseMarginDeg: '50', reason: 'x' }],
			[loops.POST, viewer, '/api/loops', {}, { product: 'drive', class: 'speed', key: 'v', name: 'V' }],
			[loop.PATCH, viewer, `/api/loops/${s.loop.id}`, { id: s.loop.id }, { name: 'x' }],
			[loop.PATCH, engineer2, `/api/loops/${s.loop.id}`, { id: s.loop.id }, { name: 'x' }],
			[grant.POST, engineer, `/api/loops/${s.loop.id}/deviations`, { id: s.loop.id }, { criteria: ['phaseMargin'], reason: 'x', expiresAt: '2999-01-01' }]
		];
		for (const [handler, who, path, params, body] of cases) {
			const res = await call(handler, who, path, params, body);
			expect(res.status, `${who.role} ${path}`).toBe(403);
			expect(res.body.error.code).toBe('forbidden');
		}
		const token = { token: r.users.lead, scopes: ['read'] as ('read' | 'upload')[] };
		expect((await call(products.POST, token, '/api/products', {}, { key: 'p3', name: 'P3' })).status).toBe(403);
		expect((await call(products.GET, token, '/api/products')).status).toBe(200);
	});

	it('performs each write for the role allowed, with 201 on creation', async () => {
		const { lead, engineer } = r.users;
		expect((await call(products.POST, lead, '/api/products', {}, { key: 'inverter', name: 'Inverter' })).status).toBe(201);
		const c = await call(classes.POST, lead, '/api/classes', {}, { key: 'pll', name: 'PLL', targets: { minPhaseMarginDeg: 45 } });
		expect(c.status).toBe(201);
		expect(c.body.requirement).toMatchObject({ version: 1, targets: { minPhaseMarginDeg: '45' } });
		const v2 = await call(requirement.PUT, lead, '/api/classes/pll/requirement', { key: 'pll' }, { minPhaseMarginDeg: '50.5', reason: 'tighter' });
		expect(v2.status).toBe(201);
		expect(v2.body).toMatchObject({ version: 2, reason: 'tighter', targets: { minPhaseMarginDeg: '50.5', minUpperGainMarginDb: null } });
		const created = await call(loops.POST, engineer, '/api/loops', {}, { product: 'inverter', class: 'pll', key: 'grid-pll', name: 'Grid PLL', tags: ['grid'] });
		expect(created.status).toBe(201);
		const patched = await call(loop.PATCH, engineer, `/api/loops/${created.body.id}`, { id: created.body.id }, { note: 'type-2 loop filter' });
		expect([patched.status, patched.body.note]).toEqual([200, 'type-2 loop filter']);
		const dev = await call(grant.POST, lead, `/api/loops/${s.loop.id}/deviations`, { id: s.loop.id }, { criteria: ['phaseMargin'], relaxed: { minPhaseMarginDeg: 40 }, reason: 'rig', expiresAt: '2999-01-01T00:00:00Z' });
		expect(dev.status).toBe(201);
		expect(dev.body.relaxed).toEqual({ minPhaseMarginDeg: '40' });
		expect((await call(revoke.DELETE, engineer, `/api/deviations/${dev.body.id}`, { id: dev.body.id })).status).toBe(403);
		const gone = await call(revoke.DELETE, lead, `/api/deviations/${dev.body.id}`, { id: dev.body.id });
		expect([gone.status, gone.body.status]).toEqual([200, 'revoked']);
		const archived = await call(loop.PATCH, r.users.admin, `/api/loops/${created.body.id}`, { id: created.body.id }, { archived: true });
		expect(archived.body.archivedAt).not.toBeNull();
	});

	it('answers bad input with 400, the field and the reason', async () => {
		const { lead } = r.users;
		const cases: [Handler, string, Record<string, string>, unknown, string | undefined][] = [
			[products.POST, '/api/products', {}, { key: 'UPPER', name: 'x' }, 'key'],
			[products.POST, '/api/products', {}, { key: 'ok' }, 'name'],
			[requirement.PUT, '/api/classes/speed/requirement', { key: 'speed' }, { minPhaseMarginDeg: '-3', reason: 'x' }, 'minPhaseMarginDeg'],
			[requirement.PUT, '/api/classes/speed/requirement', { key: 'speed' }, { minPhaseMarginDeg: '50' }, 'reason'],
			[requirement.PUT, '/api/classes/speed/requirement', { key: 'speed' }, { minPhaseMarginDeg: 'fifty', reason: 'x' }, 'minPhaseMarginDeg'],
			[loops.POST, '/api/loops', {}, { product: 'drive', class: 'speed', key: 'k' }, 'name'],
			[loop.PATCH, `/api/loops/${s.loop.id}`, { id: s.loop.id }, { archived: 'yes' }, 'archived'],
			[grant.POST, `/api/loops/${s.loop.id}/deviations`, { id: s.loop.id }, { criteria: ['phaseMargin'], reason: 'x' }, 'expiresAt'],
			[loops.POST, '/api/loops', {}, 'not json', undefined]
		];
		for (const [handler, path, params, body, field] of cases) {
			const res = await call(handler, lead, path, params, body);
			expect(res.status, JSON.stringify(body)).toBe(400);
			expect(res.body.error).toMatchObject({ code: 'invalid', ...(field && { path: field }) });
			expect(res.body.error.message.length).toBeGreaterThan(5);
		}
		const paging = await call(loops.GET, lead, '/api/loops?pageSize=5000');
		expect([paging.status, paging.body.error.path]).toEqual([400, 'pageSize']);
		const sort = await call(loops.GET, lead, '/api/loops?sort=colour');
		expect([sort.status, sort.body.error.path]).toEqual([400, 'sort']);
		const dup = await call(loops.POST, lead, '/api/loops', {}, { product: 'drive', class: 'speed', key: 'ax1-speed', name: 'again' });
		expect([dup.status, dup.body.error.code, dup.body.error.path]).toEqual([409, 'conflict', 'key']);
	});
});
