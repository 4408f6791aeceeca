import { expect } from 'vitest';
import { DomainError } from '../../../src/lib/server/errors';

/** The domain error a promise rejects with (fails the test if it resolves or throws another). */
export async function domainError(p: Promise<unknown>): Promise<DomainError> {
	const error = await p.then(
		() => null,
		(e) => e
	);
	expect(error).toBeInstanceOf(DomainError);
	return error as DomainError;
}
