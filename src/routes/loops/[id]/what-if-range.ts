/**
 * The range of gain offsets over which the loop meets its targets, for the slider: worked out in
 * a worker (a few hundred margin computations), or on the main thread when no worker starts.
 */
import { rangeWorker } from '$lib/components/plots/range-worker';
import type { RangeReply, RangeRequest } from '$lib/components/plots/what-if.worker';
import { meetsRange, type MeetsRange, type WhatIfInput } from '$lib/compliance/what-if';

export interface RangeListener {
	/** Where the range is being worked out (for tests and diagnosis). */
	source(where: 'worker' | 'main thread'): void;
	done(range: MeetsRange): void;
	failed(message: string): void;
}

/**
 * Starts working the range out; `input` is read only if it falls back to the main thread.
 * `stop()` ends a worker still running.
 */
export function startMeetsRange(
	request: RangeRequest,
	input: () => WhatIfInput,
	on: RangeListener
): { stop(): void } {
	let worker: Worker | undefined;
	const stop = () => {
		worker?.terminate();
		worker = undefined;
	};
	const onMainThread = () => {
		on.source('main thread');
		setTimeout(() => {
			try {
				on.done(meetsRange(input(), { spanDb: request.spanDb }));
			} catch (error) {
				on.failed(error instanceof Error ? error.message : String(error));
			}
		}, 50);
	};
	try {
		worker = rangeWorker();
		worker.onmessage = (e: MessageEvent<RangeReply>) => {
			on.source('worker');
			if (e.data.ok) on.done(e.data.range);
			else on.failed(e.data.message);
			stop();
		};
		worker.onerror = () => {
			stop();
			onMainThread();
		};
		worker.postMessage(request);
	} catch {
		onMainThread();
	}
	return { stop };
}
