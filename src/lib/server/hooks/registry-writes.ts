import type { Handle } from '@sveltejs/kit';
import { forgetResults } from '../db/registry-changes';

const READS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Any request that may have written (a form action, an API POST/PATCH/DELETE) drops the counts
 * the server remembers once it has finished, before its answer goes out: whoever sent it reads
 * their own change next, even if PostgreSQL's change notification is still on its way.
 */
export const handleRegistryWrites: Handle = async ({ event, resolve }) => {
	if (READS.has(event.request.method)) return resolve(event);
	try {
		return await resolve(event);
	} finally {
		forgetResults();
	}
};
