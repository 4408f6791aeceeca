/**
 * The cross-origin check (src/lib/server/hooks/csrf.ts): SvelteKit's rule for form-typed writes,
 * except API calls carrying an Authorization header (pipelines: curl -F, no Origin).
 */
import { describe, expect, it } from 'vitest';
import type { RequestEvent } from '@sveltejs/kit';
import { handleCsrf } from '../../../src/lib/server/hooks/csrf';

const ORIGIN = 'http://127.0.0.1:3000';

async function status(path: string, init: { method?: string; headers?: Record<string, string> }) {
	const url = new URL(path, ORIGIN);
	const request = new Request(url, { method: init.method ?? 'POST', headers: init.headers, body: init.method === 'GET' ? undefined : 'x' });
	const event = { request, url } as unknown as RequestEvent;
	const response = await handleCsrf({ event, resolve: async () => new Response('through', { status: 200 }) });
	return response.status;
}

describe('the cross-origin check', () => {
	it.each([
		['a form post from another site', '/products?/create', { 'content-type': 'application/x-www-form-urlencoded', origin: 'http://evil.example' }, 403],
		['a form post with no Origin', '/products?/create', { 'content-type': 'application/x-www-form-urlencoded' }, 403],
		['a text/plain API post riding on a cookie', '/api/products', { 'content-type': 'text/plain', origin: 'http://evil.example' }, 403],
		['a multipart API post riding on a cookie', '/api/loops/x/revisions', { 'content-type': 'multipart/form-data; boundary=b' }, 403],
		['a form post from our own origin', '/products?/create', { 'content-type': 'application/x-www-form-urlencoded', origin: ORIGIN }, 200],
		['a JSON API post (needs a preflight cross-site)', '/api/products', { 'content-type': 'application/json', origin: 'http://evil.example' }, 200],
		['a pipeline upload with a bearer token and no Origin', '/api/loops/x/revisions', { 'content-type': 'multipart/form-data; boundary=b', authorization: 'Bearer hr_x' }, 200],
		['a page form post with an Authorization header (no exemption outside /api)', '/products?/create', { 'content-type': 'application/x-www-form-urlencoded', authorization: 'Bearer hr_x' }, 403]
	])('%s', async (_what, path, headers, expected) => {
		expect(await status(path, { headers })).toBe(expected);
	});

	it('lets reads through whatever their origin', async () => {
		expect(await status('/loops', { method: 'GET', headers: { origin: 'http://evil.example' } })).toBe(200);
	});
});
