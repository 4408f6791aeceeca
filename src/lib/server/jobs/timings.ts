/** Optional per-phase wall-clock totals, filled in by the job code when a benchmark asks for them. */
export type Timings = Record<string, number>;

export async function timed<T>(timings: Timings | undefined, phase: string, run: () => Promise<T> | T): Promise<T> {
	if (!timings) return run();
	const started = performance.now();
	try {
		return await run();
	} finally {
		timings[phase] = (timings[phase] ?? 0) + performance.now() - started;
	}
}
