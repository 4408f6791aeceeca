/**
 * A browser without JavaScript: fetch plus a cookie jar, redirects followed by hand (so tests can
 * look at each hop), forms posted with the Origin header a browser sends. Cookies are kept per
 * host, not per port, as browsers do, and honour Path and expiry.
 */

interface StoredCookie {
	name: string;
	value: string;
	host: string;
	path: string;
	expires?: number;
	attributes: string;
}

export interface Hop {
	url: string;
	status: number;
	location: string | null;
}

export class HttpClient {
	private cookies: StoredCookie[] = [];
	/** The redirects followed by the last request, first to last. */
	hops: Hop[] = [];
	/** Where the last followed request ended up. */
	lastUrl = '';

	constructor(readonly origin: string) {}

	/** The raw Set-Cookie attributes last stored for a cookie name (to check flags). */
	cookie(name: string): StoredCookie | undefined {
		return this.cookies.find((c) => c.name === name);
	}

	clearCookies(): void {
		this.cookies = [];
	}

	private cookieHeader(url: URL): string {
		const now = Date.now();
		this.cookies = this.cookies.filter((c) => c.expires === undefined || c.expires > now);
		return this.cookies
			.filter((c) => c.host === url.hostname && (url.pathname === c.path || url.pathname.startsWith(c.path.endsWith('/') ? c.path : `${c.path}/`)))
			.map((c) => `${c.name}=${c.value}`)
			.join('; ');
	}

	private store(url: URL, response: Response): void {
		for (const header of response.headers.getSetCookie()) {
			const [pair, ...attributes] = header.split(';').map((s) => s.trim());
			const eq = pair.indexOf('=');
			const name = pair.slice(0, eq);
			const value = pair.slice(eq + 1);
			let path = url.pathname.replace(/\/[^/]*$/, '') || '/';
			let expires: number | undefined;
			for (const attribute of attributes) {
				const [key, ...rest] = attribute.split('=');
				const v = rest.join('=');
				if (/^path$/i.test(key)) path = v || '/';
				if (/^max-age$/i.test(key)) expires = Date.now() + Number(v) * 1000;
				if (/^expires$/i.test(key) && expires === undefined) expires = Date.parse(v);
			}
			this.cookies = this.cookies.filter((c) => !(c.name === name && c.host === url.hostname && c.path === path));
			if (expires === undefined || expires > Date.now()) {
				this.cookies.push({ name, value, host: url.hostname, path, expires, attributes: attributes.join('; ') });
			}
		}
	}

	/** One request, no redirect following. */
	async request(target: string, init: RequestInit = {}): Promise<Response> {
		const url = new URL(target, this.origin);
		const headers = new Headers(init.headers);
		const cookie = this.cookieHeader(url);
		if (cookie) headers.set('cookie', cookie);
		if (!headers.has('accept')) headers.set('accept', 'text/html,application/xhtml+xml');
		const response = await fetch(url, { ...init, headers, redirect: 'manual' });
		this.store(url, response);
		return response;
	}

	/** Follows redirects (any origin) the way a browser would, recording each hop. */
	async follow(first: Response, from: string, limit = 15): Promise<Response> {
		this.hops = [];
		let response = first;
		let current = new URL(from, this.origin);
		while (response.status >= 300 && response.status < 400 && response.headers.get('location')) {
			const next = new URL(response.headers.get('location')!, current);
			this.hops.push({ url: current.href, status: response.status, location: next.href });
			if (this.hops.length > limit) throw new Error(`too many redirects: ${JSON.stringify(this.hops)}`);
			await response.body?.cancel();
			current = next;
			response = await this.request(next.href);
		}
		this.lastUrl = current.href;
		return response;
	}

	async get(target: string, init: RequestInit = {}): Promise<Response> {
		return this.follow(await this.request(target, init), target);
	}

	/** A form post as a browser without JavaScript makes it; returns the first answer. */
	async post(target: string, fields: Record<string, string | string[]>, init: RequestInit = {}): Promise<Response> {
		const url = new URL(target, this.origin);
		const body = new URLSearchParams();
		for (const [key, value] of Object.entries(fields)) {
			for (const v of [value].flat()) body.append(key, v);
		}
		const headers = new Headers(init.headers);
		if (!headers.has('origin')) headers.set('origin', url.origin);
		headers.set('content-type', 'application/x-www-form-urlencoded');
		return this.request(url.href, { ...init, method: 'POST', headers, body });
	}

	/** JSON from an API route, with an optional bearer token instead of the cookies. */
	async api(path: string, token?: string): Promise<{ status: number; body: unknown }> {
		const headers: Record<string, string> = { accept: 'application/json' };
		if (token) headers.authorization = `Bearer ${token}`;
		const response = await this.request(path, { headers });
		return { status: response.status, body: await response.json() };
	}
}
