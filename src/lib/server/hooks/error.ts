import type { HandleServerError } from '@sveltejs/kit';
import { DomainError, isOutage } from '../errors';
import { markOutage } from './outage';

export const handleError: HandleServerError = ({ error, event, status, message }) => {
	const errorId = event.locals.requestId ?? crypto.randomUUID();
	if (error instanceof DomainError) return { message: error.message, errorId };
	if (status === 404) return { message, errorId };
	if (isOutage(error)) {
		markOutage(event);
		console.error(`[${errorId}] service unavailable on ${event.url.pathname}:`, error);
		return { message: 'A service Headroom depends on is unavailable; try again shortly.', errorId };
	}
	console.error(`[${errorId}] ${event.request.method} ${event.url.pathname}:`, error);
	return { message: 'Something went wrong on our side.', errorId };
};
