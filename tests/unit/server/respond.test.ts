import { describe, expect, it } from 'vitest';
import { api, errorBody } from '../../../src/lib/server/http/respond';
import { Conflict, Invalid, NotFound } from '../../../src/lib/server/errors';

describe('API error mapping', () => {
	it('answers a domain error with its status and the contract body', async () => {
		const response = await api(async () => {
			throw new Invalid('leading coefficient is zero', 'blocks[1].denominator');
		});
		expect(response.status).toBe(400);
		expect(await response.json()).toEqual({
			error: {
				message: 'leading coefficient is zero',
				code: 'invalid',
				path: 'blocks[1].denominator'
			}
		});
	});

	it('maps each domain error to its own status', async () => {
		const statuses = await Promise.all(
			[new NotFound(), new Conflict('taken')].map(async (e) =>
				(
					await api(async () => {
						throw e;
					})
				).status
			)
		);
		expect(statuses).toEqual([404, 409]);
	});

	it('turns a refused database connection into 503, not 500', async () => {
		const response = await api(async () => {
			throw Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:5'), { code: 'ECONNREFUSED' });
		});
		expect(response.status).toBe(503);
		expect((await response.json()).error.code).toBe('unavailable');
	});

	it('rethrows anything else so handleError logs it', async () => {
		await expect(
			api(async () => {
				throw new TypeError('bug');
			})
		).rejects.toThrow('bug');
	});

	it('omits the path when there is none', () => {
		expect(errorBody('forbidden', 'no')).toEqual({ error: { message: 'no', code: 'forbidden' } });
	});
});
