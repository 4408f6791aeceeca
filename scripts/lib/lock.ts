// One `npm start` per data folder. The lock file records our pid (with its start time, since
// pids get reused) and the process groups of our children, so that a launcher that was killed
// with SIGKILL leaves nothing the next start cannot clean up.
import { linkSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { procStartTime } from './lifecycle';
import { groupAlive } from './processes';
import { warn } from './log';

interface LockData {
	pid: number;
	started: string | null;
	url: string;
	groups: { pgid: number; started: string | null }[];
}

export class AlreadyRunningError extends Error {
	constructor(
		readonly pid: number,
		readonly url: string
	) {
		super(`Headroom is already running (pid ${pid}) at ${url}`);
	}
}

function isSameProcess(pid: number, started: string | null): boolean {
	try {
		process.kill(pid, 0);
	} catch (err) {
		if ((err as NodeJS.ErrnoException).code !== 'EPERM') return false;
	}
	return started === null || procStartTime(pid) === started;
}

function read(file: string): LockData | undefined {
	try {
		return JSON.parse(readFileSync(file, 'utf8')) as LockData;
	} catch {
		return undefined;
	}
}

export class Lock {
	private data: LockData;

	constructor(
		private readonly file: string,
		url: string
	) {
		this.data = { pid: process.pid, started: procStartTime(process.pid), url, groups: [] };
		// Write a complete file first and link it into place: link() fails if the lock exists,
		// so two starters can never both win, and nobody ever reads a half-written lock.
		for (let attempt = 0; ; attempt++) {
			const temp = `${file}.${process.pid}`;
			writeFileSync(temp, JSON.stringify(this.data));
			try {
				linkSync(temp, file);
				return;
			} catch (err) {
				if ((err as NodeJS.ErrnoException).code !== 'EEXIST' || attempt > 0) throw err;
				this.takeOverStale();
			} finally {
				rmSync(temp, { force: true });
			}
		}
	}

	private takeOverStale(): void {
		const old = read(this.file);
		if (old && isSameProcess(old.pid, old.started)) throw new AlreadyRunningError(old.pid, old.url);
		const leftovers = (old?.groups ?? []).filter(
			(g) => groupAlive(g.pgid) && isSameProcess(g.pgid, g.started)
		);
		for (const group of leftovers) {
			warn(`killing process group ${group.pgid} left over from a launcher that died`);
			try {
				process.kill(-group.pgid, 'SIGKILL');
			} catch {
				// Gone in the meantime.
			}
		}
		// SIGKILL is delivered asynchronously: wait until their ports are really released.
		const deadline = Date.now() + 5_000;
		while (leftovers.some((g) => groupAlive(g.pgid)) && Date.now() < deadline) {
			Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 100);
		}
		if (old) warn(`taking over a stale lock of pid ${old.pid}, which is no longer running`);
		rmSync(this.file, { force: true });
	}

	/** Remember a child's process group, for the cleanup above. */
	addGroup(pgid: number): void {
		if (pgid <= 0) return;
		this.data.groups.push({ pgid, started: procStartTime(pgid) });
		writeFileSync(this.file, JSON.stringify(this.data));
	}

	release(): void {
		if (read(this.file)?.pid === process.pid) rmSync(this.file, { force: true });
	}
}
