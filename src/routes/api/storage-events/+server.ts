import { json } from '@sveltejs/kit';
import { timingSafeEqual } from 'node:crypto';
import { api, apiError } from '$lib/server/http/respond';
import { forkEm } from '$lib/server/db/orm';
import { announceObject } from '$lib/server/revisions/upload';
import { parseModelKey } from '$lib/server/revisions/keys';
import type { RequestHandler } from './$types';

interface S3Record {
	eventName?: string;
	s3?: { object?: { key?: string } };
}

function secretMatches(given: string | null): boolean {
	const expected = process.env.STORAGE_EVENTS_SECRET ?? '';
	if (!expected || !given) return false;
	const a = Buffer.from(given);
	const b = Buffer.from(expected);
	return a.length === b.length && timingSafeEqual(a, b);
}

/**
 * The object store's event notifications (S3 event-notification JSON). Public route guarded by a
 * shared secret (header x-headroom-storage-secret), not by a user: the store is the caller.
 * Each created object we issued a presigned URL for is announced exactly once.
 */
export const POST = (async (event) =>
	api(async () => {
		if (!secretMatches(event.request.headers.get('x-headroom-storage-secret'))) {
			return apiError(401, 'unauthenticated', 'Unknown storage event sender.');
		}
		const body = (await event.request.json().catch(() => null)) as { Records?: S3Record[] } | null;
		const records = Array.isArray(body?.Records) ? body.Records : [];
		const outcomes: string[] = [];
		const em = await forkEm();
		for (const r of records) {
			if (!r.eventName?.startsWith('ObjectCreated')) continue;
			// S3 sends keys URL-encoded with '+' for spaces.
			const key = decodeURIComponent((r.s3?.object?.key ?? '').replace(/\+/g, ' '));
			if (!parseModelKey(key)) continue;
			outcomes.push(await announceObject(em.fork(), key));
		}
		return json({ received: records.length, outcomes });
	})) satisfies RequestHandler;
