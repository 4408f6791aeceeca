import { json } from '@sveltejs/kit';
import { DomainError, STATUS, isOutage } from '../errors';

/** The JSON API's error body: `{ "error": { "message", "code", "path"? } }`. */
export function errorBody(code: string, message: string, path?: string) {
	return { error: path === undefined ? { message, code } : { message, code, path } };
}

export function apiError(status: number, code: string, message: string, path?: string): Response {
	return json(errorBody(code, message, path), { status });
}

/**
 * Run an API handler and turn domain errors into their HTTP answer. Anything else is rethrown so
 * SvelteKit's handleError logs it with an id and answers a generic 500.
 */
export async function api(handler: () => Promise<Response>): Promise<Response> {
	try {
		return await handler();
	} catch (error) {
		if (error instanceof DomainError) {
			return apiError(STATUS[error.code], error.code, error.message, error.path);
		}
		if (isOutage(error)) {
			return apiError(503, 'unavailable', 'A service Headroom depends on is unavailable.');
		}
		throw error;
	}
}
