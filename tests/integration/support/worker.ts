/**
 * A real worker process for integration tests, started exactly as `npm run worker` does
 * (`node --import tsx` keeps it one process, so a signal reaches the worker itself).
 */
import { spawn, type ChildProcess } from 'node:child_process';

export interface TestWorker {
	child: ChildProcess;
	/** Everything the worker printed so far (stdout and stderr). */
	log(): string;
	/** Polls the worker's output until `text` appears (or the process dies, or the deadline passes). */
	waitForOutput(text: string, ms?: number): Promise<void>;
	/** SIGKILL: no handler runs, no job is completed or failed — as when a machine dies. */
	kill(): Promise<void>;
	/** SIGTERM and wait for the exit (no-op when it already exited). */
	stop(): Promise<void>;
}

const alive = (c: ChildProcess) => c.exitCode === null && c.signalCode === null;

export async function startTestWorker(env: Record<string, string>): Promise<TestWorker> {
	const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], {
		env: { ...process.env, ...env },
		stdio: ['ignore', 'pipe', 'pipe']
	});
	let output = '';
	child.stdout?.on('data', (d) => (output += d));
	child.stderr?.on('data', (d) => (output += d));
	const exited = new Promise<void>((res) => child.once('exit', () => res()));
	const signal = async (name: NodeJS.Signals) => {
		if (!alive(child)) return;
		child.kill(name);
		await exited;
	};
	const worker: TestWorker = {
		child,
		log: () => output,
		async waitForOutput(text, ms = 60_000) {
			const end = Date.now() + ms;
			while (!output.includes(text)) {
				if (!alive(child)) throw new Error(`the worker exited before printing "${text}":\n${output}`);
				if (Date.now() > end) throw new Error(`the worker did not print "${text}" within ${ms / 1000}s:\n${output}`);
				await new Promise((res) => setTimeout(res, 100));
			}
		},
		kill: () => signal('SIGKILL'),
		stop: () => signal('SIGTERM')
	};
	await worker.waitForOutput('ready');
	return worker;
}

/** Polls `probe` until it answers something other than undefined. */
export async function until<T>(what: string, probe: () => Promise<T | undefined>, ms = 60_000, context = () => ''): Promise<T> {
	const end = Date.now() + ms;
	for (;;) {
		const v = await probe();
		if (v !== undefined) return v;
		if (Date.now() > end) throw new Error(`timed out waiting for ${what}\n${context()}`);
		await new Promise((res) => setTimeout(res, 150));
	}
}
