/** Starts the what-if range worker (Vite bundles it from this URL; no alias inside `new URL`). */
export const rangeWorker = () =>
	new Worker(new URL('./what-if.worker.ts', import.meta.url), { type: 'module' });
