/**
 * CPU time by process family, read from /proc, for benchmarks on a machine whose cores are
 * shared by the database, the app and the load generator: "where did each request's CPU go".
 */
import { readdirSync, readFileSync } from 'node:fs';

interface Stat {
	pid: number;
	ppid: number;
	pgrp: number;
	/** utime + stime in clock ticks. */
	ticks: number;
}

// Linux reports in USER_HZ, which is 100 on every mainstream configuration.
const MS_PER_TICK = 10;

function stats(): Stat[] {
	const out: Stat[] = [];
	for (const name of readdirSync('/proc')) {
		if (!/^\d+$/.test(name)) continue;
		try {
			const s = readFileSync(`/proc/${name}/stat`, 'utf8');
			// "pid (comm) state ppid pgrp … utime(14) stime(15)"; comm may hold spaces.
			const f = s.slice(s.lastIndexOf(')') + 2).split(' ');
			out.push({
				pid: Number(name),
				ppid: Number(f[1]),
				pgrp: Number(f[2]),
				ticks: Number(f[11]) + Number(f[12])
			});
		} catch {
			// gone while we looked
		}
	}
	return out;
}

/** A family: a process group (an app process started by the supervisor) or a parent and its children (PostgreSQL). */
export type Family = { group: number } | { parent: number };

const member = (s: Stat, f: Family) =>
	'group' in f ? s.pgrp === f.group : s.pid === f.parent || s.ppid === f.parent;

/** CPU milliseconds of each family so far (exited children are not counted). */
export function cpuMs(families: Record<string, Family>): Record<string, number> {
	const all = stats();
	const self = process.cpuUsage();
	const out: Record<string, number> = { bench: (self.user + self.system) / 1000 };
	for (const [name, f] of Object.entries(families))
		out[name] = all.filter((s) => member(s, f)).reduce((a, s) => a + s.ticks, 0) * MS_PER_TICK;
	return out;
}

/** Per-request CPU ms of each family between two readings, as "web 1.2 · postgres 0.8 · bench 0.4". */
export function perRequest(
	before: Record<string, number>,
	after: Record<string, number>,
	requests: number
): string {
	return Object.keys(after)
		.map((k) => `${k} ${((after[k] - (before[k] ?? 0)) / Math.max(1, requests)).toFixed(2)}`)
		.join(' · ');
}

/** The postmaster's pid: the parent of any backend (e.g. `select pg_backend_pid()`). */
export function parentOf(pid: number): number {
	const s = readFileSync(`/proc/${pid}/stat`, 'utf8');
	return Number(s.slice(s.lastIndexOf(')') + 2).split(' ')[1]);
}
