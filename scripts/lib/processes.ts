// Child processes of the launcher and of the test runner.
// Every child gets its own process group (detached: true) so that a Ctrl-C on the terminal does
// not reach it directly: we stop children ourselves, in reverse start order, and signal the
// whole group (kill(-pid)) so grandchildren (sh -c, tsx's inner node, vite's workers) go too.
import { spawn, type ChildProcess } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { createInterface } from 'node:readline';
import { setTimeout as sleep } from 'node:timers/promises';
import { error, errorMessage, prefix, warn } from './log';

export interface ExitInfo {
	code: number | null;
	signal: NodeJS.Signals | null;
}

export interface ChildSpec {
	name: string;
	command: string;
	args?: string[];
	env?: NodeJS.ProcessEnv;
	cwd?: string;
	/** Run `command` through `sh -c` (for user-supplied HEADROOM_*_CMD overrides). */
	shell?: boolean;
	/** Pass output through untouched (keeps vitest's colours and layout) instead of prefixing. */
	inherit?: boolean;
	/** How long a child gets after SIGTERM before its group is killed. */
	stopTimeoutMs?: number;
}

export interface Child {
	name: string;
	pid: number;
	exited: Promise<ExitInfo>;
	readonly running: boolean;
	stop(): Promise<ExitInfo>;
}

interface Entry {
	name: string;
	stop: () => Promise<unknown>;
	/** Last resort from process.on('exit'), where nothing asynchronous runs any more. */
	killSync: () => void;
}

export function describeExit({ code, signal }: ExitInfo): string {
	return signal ? `signal ${signal}` : `exit code ${code}`;
}

/**
 * Whether any live process is left in the group. Reads /proc so zombies do not count: the
 * container's init may never reap reparented grandchildren, and kill(-pgid, 0) sees those.
 */
export function groupAlive(pgid: number): boolean {
	let pids: string[];
	try {
		pids = readdirSync('/proc').filter((name) => /^\d+$/.test(name));
	} catch {
		try {
			process.kill(-pgid, 0);
			return true;
		} catch (err) {
			return (err as NodeJS.ErrnoException).code === 'EPERM';
		}
	}
	for (const pid of pids) {
		try {
			const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
			// "pid (comm) state ppid pgrp …"; comm may itself contain spaces and parentheses.
			const [state, , pgrp] = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
			if (Number(pgrp) === pgid && state !== 'Z' && state !== 'X') return true;
		} catch {
			// The process went away while we looked.
		}
	}
	return false;
}

function signalGroup(pid: number, signal: NodeJS.Signals): void {
	try {
		process.kill(-pid, signal);
	} catch {
		// The group is already gone.
	}
}

function pipeLines(stream: NodeJS.ReadableStream | null, out: NodeJS.WriteStream, name: string) {
	if (!stream) return;
	const lines = createInterface({ input: stream, crlfDelay: Infinity });
	lines.on('line', (line) => out.write(`${prefix(name)} ${line}\n`));
}

const supervisors = new Set<Supervisor>();
/** SIGKILL to every child group of every supervisor: for process exit and a second Ctrl-C. */
export function killEverythingSync(): void {
	for (const supervisor of supervisors) supervisor.killAllSync();
}
process.on('exit', killEverythingSync);

export class Supervisor {
	private entries: Entry[] = [];
	private stopping: Promise<void> | undefined;
	/** Called when a long-running child exits while nobody asked it to. */
	onUnexpectedExit: (child: Child, exit: ExitInfo) => void = () => {};
	/** Called for every child right after it is spawned (the launcher records its group). */
	onSpawn: (child: Child) => void = () => {};

	constructor() {
		supervisors.add(this);
	}

	get isStopping(): boolean {
		return this.stopping !== undefined;
	}

	private spawnChild(spec: ChildSpec): Child {
		if (this.stopping) throw new Error(`not starting ${spec.name}: shutting down`);
		const child: ChildProcess = spawn(spec.command, spec.args ?? [], {
			cwd: spec.cwd,
			env: spec.env ?? process.env,
			shell: spec.shell ?? false,
			detached: true,
			stdio: ['ignore', spec.inherit ? 'inherit' : 'pipe', spec.inherit ? 'inherit' : 'pipe']
		});
		const pid = child.pid;
		const exited = new Promise<ExitInfo>((resolve) => {
			child.once('exit', (code, signal) => resolve({ code, signal }));
			// spawn failures (ENOENT…) emit 'error' and never 'exit'.
			child.once('error', (err) => {
				error(`${spec.name}: ${err.message}`);
				resolve({ code: 127, signal: null });
			});
		});
		if (!spec.inherit) {
			pipeLines(child.stdout, process.stdout, spec.name);
			pipeLines(child.stderr, process.stderr, spec.name);
		}
		let running = pid !== undefined;
		void exited.then(() => (running = false));
		const timeoutMs = spec.stopTimeoutMs ?? 10_000;
		let stopPromise: Promise<ExitInfo> | undefined;
		const stop = () =>
			(stopPromise ??= (async () => {
				if (pid === undefined) return exited;
				const deadline = Date.now() + timeoutMs;
				if (running || groupAlive(pid)) signalGroup(pid, 'SIGTERM');
				await Promise.race([exited, sleep(timeoutMs)]);
				// Wait for the rest of the group too: a shell or tsx parent can exit before its child.
				while (groupAlive(pid) && Date.now() < deadline) await sleep(100);
				if (running || groupAlive(pid)) {
					warn(`${spec.name} did not stop within ${timeoutMs / 1000}s: killing it`);
					signalGroup(pid, 'SIGKILL');
				}
				return exited;
			})());
		const handle: Child = {
			name: spec.name,
			pid: pid ?? -1,
			exited,
			get running() {
				return running;
			},
			stop
		};
		this.onSpawn(handle);
		return handle;
	}

	private register(child: Child): Entry {
		const entry: Entry = {
			name: child.name,
			stop: () => child.stop(),
			killSync: () => {
				if (child.pid > 0 && groupAlive(child.pid)) signalGroup(child.pid, 'SIGKILL');
			}
		};
		this.entries.push(entry);
		return entry;
	}

	/**
	 * A long-running service; it stays listed until stopAll() (even once exited, so a leftover
	 * grandchild in its group is still cleaned up). Its unexpected exit goes to onUnexpectedExit.
	 */
	start(spec: ChildSpec): Child {
		const child = this.spawnChild(spec);
		this.register(child);
		void child.exited.then((exit) => {
			if (!this.stopping) this.onUnexpectedExit(child, exit);
		});
		return child;
	}

	/** A one-shot command (migrate, seed, build, vitest); resolves with its exit. */
	async run(spec: ChildSpec): Promise<ExitInfo> {
		const child = this.spawnChild(spec);
		const entry = this.register(child);
		const exit = await child.exited;
		// Whatever it started and left running (a test's own server or worker) goes with it.
		if (child.pid > 0 && groupAlive(child.pid)) {
			warn(`${spec.name} left processes running: stopping them`);
			await child.stop();
		}
		this.entries = this.entries.filter((e) => e !== entry);
		return exit;
	}

	/** Like run(), but a non-zero exit becomes an error naming the command. */
	async runOrThrow(spec: ChildSpec): Promise<void> {
		const exit = await this.run(spec);
		if (this.stopping) throw new Error(`${spec.name} interrupted: shutting down`);
		if (exit.code !== 0) throw new Error(`${spec.name} failed (${describeExit(exit)})`);
	}

	/** Something that is not our child but must be stopped in turn (PostgreSQL via pg_ctl). */
	defer(name: string, stop: () => Promise<unknown>, killSync: () => void = () => {}): void {
		this.entries.push({ name, stop, killSync });
	}

	/** Stops everything in reverse start order; safe to call repeatedly. */
	stopAll(): Promise<void> {
		this.stopping ??= (async () => {
			for (const entry of [...this.entries].reverse()) {
				try {
					await entry.stop();
				} catch (err) {
					error(`stopping ${entry.name}: ${errorMessage(err)}`);
				}
			}
			this.entries = [];
			supervisors.delete(this);
		})();
		return this.stopping;
	}

	killAllSync(): void {
		for (const entry of [...this.entries].reverse()) {
			try {
				entry.killSync();
			} catch {
				// Best effort: the process is exiting.
			}
		}
	}
}
