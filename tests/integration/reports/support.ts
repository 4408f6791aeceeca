/** Calling the report routes' handlers directly, as a signed-in user or a token with scopes. */
import type { Actor } from '../../../src/lib/server/registry/common';

export type Handler = (event: never) => Promise<Response>;
export type Who = Actor | null | { token: Actor; scopes: ('read' | 'upload')[] };

export async function call(
	handler: Handler,
	who: Who,
	path: string,
	params: Record<string, string> = {},
	body?: unknown
) {
	const url = new URL(`http://headroom.test${path}`);
	const user = who && 'token' in who ? who.token : who;
	const scopes =
		who && 'token' in who ? who.scopes : user?.role === 'viewer' ? ['read'] : ['read', 'upload'];
	const init: RequestInit =
		body === undefined
			? { method: 'GET' }
			: {
					method: 'POST',
					body: typeof body === 'string' ? body : JSON.stringify(body),
					headers: { 'content-type': 'application/json' }
				};
	return handler({
		url,
		request: new Request(url, init),
		params,
		locals: { user, scopes: user ? scopes : [], requestId: 't' }
	} as never);
}

export const json = async (res: Response) => ({ status: res.status, body: await res.json() });
