/** The worker's own entry point (`npm run worker`): runs job handlers until SIGINT/SIGTERM. */
import { startWorker } from '../src/lib/server/jobs/worker';
import { closeOrm } from '../src/lib/server/db/orm';

const worker = await startWorker();
console.log(`[worker] pid ${process.pid} ready`);

let stopping = false;
async function shutdown(signal: string) {
	if (stopping) return;
	stopping = true;
	console.log(`[worker] ${signal}: finishing running jobs`);
	await worker.stop();
	await closeOrm();
	process.exit(0);
}
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));
