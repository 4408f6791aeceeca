/**
 * Domain errors thrown by services; one helper (src/lib/server/http/respond.ts) maps them to HTTP.
 * Routes never echo arbitrary exception messages: only these carry text meant for users.
 */
export type ErrorCode =
	| 'invalid'
	| 'unauthenticated'
	| 'forbidden'
	| 'not_found'
	| 'conflict'
	| 'too_large'
	| 'unavailable';

export class DomainError extends Error {
	constructor(
		readonly code: ErrorCode,
		message: string,
		/** Where the problem is: a field name or a JSON path inside an uploaded file. */
		readonly path?: string
	) {
		super(message);
		this.name = 'DomainError';
	}
}

export class Invalid extends DomainError {
	constructor(message: string, path?: string) {
		super('invalid', message, path);
	}
}
export class Unauthenticated extends DomainError {
	constructor(message = 'Sign in first.') {
		super('unauthenticated', message);
	}
}
export class Forbidden extends DomainError {
	constructor(message = 'Your role does not allow this.') {
		super('forbidden', message);
	}
}
export class NotFound extends DomainError {
	constructor(message = 'Not found.') {
		super('not_found', message);
	}
}
export class Conflict extends DomainError {
	constructor(message: string, path?: string) {
		super('conflict', message, path);
	}
}
export class TooLarge extends DomainError {
	constructor(message: string) {
		super('too_large', message);
	}
}
export class Unavailable extends DomainError {
	constructor(message: string) {
		super('unavailable', message);
	}
}

export const STATUS: Record<ErrorCode, number> = {
	invalid: 400,
	unauthenticated: 401,
	forbidden: 403,
	not_found: 404,
	conflict: 409,
	too_large: 413,
	unavailable: 503
};

/** A lost database or store connection is an outage (503), not a bug (500). */
export function isOutage(error: unknown): boolean {
	if (error instanceof Unavailable) return true;
	const code = (error as { code?: string } | undefined)?.code ?? '';
	const message = error instanceof Error ? error.message : '';
	return (
		['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', '57P01', '57P03', '08006', '08001'].includes(code) ||
		/Connection terminated|connect ECONNREFUSED|timeout exceeded when trying to connect/i.test(message)
	);
}
