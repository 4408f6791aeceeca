/**
 * Works out the what-if gain range off the main thread (a few hundred margin computations), so
 * the loop page stays responsive while it runs. Message in: the model, targets, deviations (dates
 * as ISO strings) and the clock; out: `{ ok: true, range }` or `{ ok: false, message }`.
 */
import numeric from 'numeric';
import { meetsRange, type MeetsRange } from '../../compliance/what-if';
import type { Targets } from '../../compliance/criteria';
import type { LoopModel } from '../../margins/schema';

(globalThis as { numeric?: unknown }).numeric ??= numeric;

export interface RangeRequest {
	model: LoopModel;
	targets: Targets;
	deviations: {
		id: string;
		relaxed: Targets;
		startsAt: string;
		expiresAt: string;
		revokedAt: string | null;
	}[];
	now: string;
	spanDb: number;
}
export type RangeReply = { ok: true; range: MeetsRange } | { ok: false; message: string };

self.onmessage = (e: MessageEvent<RangeRequest>) => {
	const { model, targets, deviations, now, spanDb } = e.data;
	let reply: RangeReply;
	try {
		const range = meetsRange(
			{
				model,
				targets,
				now: new Date(now),
				deviations: deviations.map((d) => ({
					...d,
					startsAt: new Date(d.startsAt),
					expiresAt: new Date(d.expiresAt),
					revokedAt: d.revokedAt ? new Date(d.revokedAt) : null
				}))
			},
			{ spanDb }
		);
		reply = { ok: true, range };
	} catch (error) {
		reply = { ok: false, message: error instanceof Error ? error.message : String(error) };
	}
	self.postMessage(reply);
};
