import { Invalid } from '../errors';

/** The request's JSON object body; anything else is a 400 the client can act on. */
export async function readJsonObject(request: Request): Promise<Record<string, unknown>> {
	let body: unknown;
	try {
		body = await request.json();
	} catch {
		throw new Invalid('The body must be JSON (Content-Type: application/json).');
	}
	if (!body || typeof body !== 'object' || Array.isArray(body)) throw new Invalid('The body must be a JSON object.');
	return body as Record<string, unknown>;
}
