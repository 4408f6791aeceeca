// How the launcher and the test runner end: on signals, and when whoever started them is gone.
import { readFileSync } from 'node:fs';
import { info } from './log';
import { killEverythingSync } from './processes';

/** Field 22 of /proc/PID/stat: start time in ticks since boot (tells a reused pid apart). */
export function procStartTime(pid: number): string | null {
	try {
		const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
		return stat.slice(stat.lastIndexOf(')') + 2).split(' ')[19] ?? null;
	} catch {
		return null;
	}
}

function parentOf(pid: number): number {
	try {
		const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
		return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
	} catch {
		return 0;
	}
}

function isNpm(pid: number): boolean {
	try {
		return /^npm\b/.test(readFileSync(`/proc/${pid}/cmdline`, 'utf8'));
	} catch {
		return false;
	}
}

/**
 * Calls `gone` once the process that started us disappears. A SIGTERM to `npm start` kills
 * npm's `sh -c` but never reaches tsx or us, which would then run on with no owner; so under
 * npm every process up to npm itself is watched, otherwise just the parent.
 */
export function onParentGone(gone: (pid: number) => void): void {
	const watched: { pid: number; started: string | null }[] = [];
	let pid = process.ppid;
	while (pid > 1 && watched.length < 5) {
		watched.push({ pid, started: procStartTime(pid) });
		if (!process.env.npm_lifecycle_event || isNpm(pid)) break;
		pid = parentOf(pid);
	}
	if (process.env.npm_lifecycle_event && !watched.some((w) => isNpm(w.pid))) watched.splice(1);
	const timer = setInterval(() => {
		const lost = watched.find((w) => procStartTime(w.pid) !== w.started);
		if (lost) {
			clearInterval(timer);
			gone(lost.pid);
		}
	}, 1_000);
	timer.unref();
}

/**
 * SIGINT/SIGTERM/SIGHUP run `shutdown` once; a second signal while it runs kills every child
 * group at once, for when a child hangs and the user presses Ctrl-C again. A repeat within the
 * first second is ignored: under `npm start` the tsx CLI relays the terminal's SIGINT, so the
 * launcher gets every Ctrl-C twice.
 */
export function onSignals(shutdown: (signal: NodeJS.Signals) => void): void {
	let first = 0;
	for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
		process.on(signal, () => {
			if (first) {
				if (Date.now() - first < 1_000) return;
				info(`${signal} again: killing everything now`);
				killEverythingSync();
				process.exit(130);
			}
			first = Date.now();
			info(`${signal} received: stopping`);
			shutdown(signal);
		});
	}
}
