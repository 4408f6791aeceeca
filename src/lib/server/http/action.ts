import { fail } from '@sveltejs/kit';
import { DomainError, STATUS } from '../errors';

/**
 * For a page action's catch: a domain error becomes a failed action with its message (written
 * for users); anything else is rethrown for handleError to log.
 */
export function domainFailure(error: unknown, body: Record<string, unknown> = {}) {
	if (error instanceof DomainError) return fail(STATUS[error.code], { ...body, problem: error.message });
	throw error;
}
