import { describe, expect, it } from 'vitest';
import type { Handle, RequestEvent, ResolveOptions } from '@sveltejs/kit';
import { chain } from '../../../src/lib/server/hooks/chain';

// The order and option rules are those of `sequence` in @sveltejs/kit/hooks, as its own
// documentation states them (pre-processing in order, post-processing and page-chunk transforms
// in reverse, the first filterSerializedResponseHeaders and preload that is set).
const event = (tag: string) => ({ tag }) as unknown as RequestEvent;

describe('chain of handle hooks', () => {
	it('runs pre-processing in order and post-processing in reverse, and passes on a new event', async () => {
		const log: string[] = [];
		const hook =
			(name: string, swap?: string): Handle =>
			async ({ event: e, resolve }) => {
				log.push(`${name} before (${(e as unknown as { tag: string }).tag})`);
				const response = await resolve(swap ? event(swap) : e);
				log.push(`${name} after`);
				return response;
			};
		const seen: string[] = [];
		const response = await chain(
			hook('first'),
			hook('second', 'replaced'),
			hook('third')
		)({
			event: event('original'),
			resolve: async (e) => {
				seen.push((e as unknown as { tag: string }).tag);
				return new Response('ok');
			}
		});
		expect(await response.text()).toBe('ok');
		expect(log).toEqual([
			'first before (original)',
			'second before (original)',
			'third before (replaced)',
			'third after',
			'second after',
			'first after'
		]);
		expect(seen).toEqual(['replaced']);
	});

	it('lets a hook answer without calling the rest', async () => {
		let reached = false;
		const stop: Handle = async () => new Response('stopped', { status: 401 });
		const never: Handle = async ({ event: e, resolve }) => {
			reached = true;
			return resolve(e);
		};
		const response = await chain(
			stop,
			never
		)({
			event: event('x'),
			resolve: async () => new Response('resolved')
		});
		expect(response.status).toBe(401);
		expect(reached).toBe(false);
	});

	it('merges resolve options: inner transform first, the outermost filter and preload win', async () => {
		const withOptions =
			(options: ResolveOptions): Handle =>
			({ event: e, resolve }) =>
				resolve(e, options);
		let got: ResolveOptions | undefined;
		await chain(
			withOptions({
				transformPageChunk: ({ html }) => `${html}+outer`,
				filterSerializedResponseHeaders: (name) => name === 'outer'
			}),
			({ event: e, resolve }) => resolve(e),
			withOptions({
				transformPageChunk: async ({ html }) => `${html}+inner`,
				filterSerializedResponseHeaders: () => true,
				preload: ({ type }) => type === 'js'
			})
		)({
			event: event('x'),
			resolve: async (_e, options) => {
				got = options;
				return new Response('');
			}
		});
		expect(await got!.transformPageChunk!({ html: 'page', done: true })).toBe('page+inner+outer');
		expect(got!.filterSerializedResponseHeaders!('inner', '')).toBe(false);
		expect(got!.filterSerializedResponseHeaders!('outer', '')).toBe(true);
		expect(got!.preload!({ type: 'js', path: '/a.js' })).toBe(true);
		expect(got!.preload!({ type: 'css', path: '/a.css' })).toBe(false);
	});

	it('passes no options when no hook gives any', async () => {
		let got: ResolveOptions | undefined = {};
		await chain(({ event: e, resolve }) => resolve(e))({
			event: event('x'),
			resolve: async (_e, options) => {
				got = options;
				return new Response('');
			}
		});
		expect(got).toBeUndefined();
	});
});
