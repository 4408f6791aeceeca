/**
 * What the trust suite's files share: a worker process of their own, polling without timed
 * assertions, client requests that can never hang (every one is time-boxed), multipart uploads
 * through the real HTTP path, and the sessions of the demo users.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { connect } from 'node:net';
import { resolve } from 'node:path';
import { freePort } from '../../../scripts/lib/ports';
import { HttpClient } from '../support/http-client';
import { serverEnv } from '../support/built-app';
import { appEnv, signIn } from '../auth/flows';

const root = resolve(import.meta.dirname, '../../..');

/** The longest any single client request may take before the test calls it hung. */
export const REQUEST_BOX_MS = 15_000;

/** Polls until probe() returns something other than undefined; the message says what never came. */
export async function until<T>(what: string, probe: () => Promise<T | undefined>, ms = 60_000, log = () => ''): Promise<T> {
	const end = Date.now() + ms;
	let lastError: unknown;
	for (;;) {
		try {
			const v = await probe();
			if (v !== undefined) return v;
		} catch (err) {
			lastError = err;
		}
		if (Date.now() > end) {
			throw new Error(`timed out waiting for ${what}${lastError ? ` (last error: ${String(lastError)})` : ''}\n${log()}`);
		}
		await new Promise((r) => setTimeout(r, 200));
	}
}

export interface Boxed {
	status: number;
	body: string;
	ms: number;
	/** True when the time box ran out: the request hung. */
	hung: boolean;
	/** The connection failed outright (refused, reset). */
	networkError?: string;
}

/** One request that answers within REQUEST_BOX_MS or is reported as hung. */
export async function boxedFetch(url: string, init: RequestInit = {}, boxMs = REQUEST_BOX_MS): Promise<Boxed> {
	const started = Date.now();
	try {
		const response = await fetch(url, { ...init, redirect: 'manual', signal: AbortSignal.timeout(boxMs) });
		const body = await response.text();
		return { status: response.status, body, ms: Date.now() - started, hung: false };
	} catch (err) {
		const e = err as Error & { cause?: { code?: string } };
		const hung = e.name === 'TimeoutError' || e.name === 'AbortError';
		return { status: 0, body: '', ms: Date.now() - started, hung, networkError: hung ? undefined : (e.cause?.code ?? e.message) };
	}
}

/** A multipart upload as a pipeline sends it: POST /api/loops/:id/revisions with a bearer token. */
export function uploadForm(bytes: Uint8Array | string, fileName: string, note?: string): FormData {
	const form = new FormData();
	form.append('file', new Blob([typeof bytes === 'string' ? new TextEncoder().encode(bytes) : new Uint8Array(bytes)]), fileName);
	if (note !== undefined) form.append('note', note);
	return form;
}

export async function apiUpload(base: string, loopId: string, token: string, bytes: Uint8Array | string, fileName: string, note?: string) {
	const response = await boxedFetch(`${base}/api/loops/${loopId}/revisions`, {
		method: 'POST',
		headers: { authorization: `Bearer ${token}`, accept: 'application/json' },
		body: uploadForm(bytes, fileName, note)
	});
	let json: { revision?: { id: string; number: number; state: string }; error?: { message: string; code: string; path?: string } } = {};
	try {
		json = JSON.parse(response.body);
	} catch {
		// Not JSON: the caller's assertion on status will say so.
	}
	return { ...response, json };
}

export interface WorkerProcess {
	child: ChildProcess;
	log(): string;
	stop(): Promise<void>;
}

/** `scripts/worker.ts` as its own process against the given database (and any overrides). */
export async function startWorker(databaseUrl: string, env: Record<string, string | undefined> = {}): Promise<WorkerProcess> {
	let output = '';
	const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], {
		cwd: root,
		env: { ...process.env, DATABASE_URL: databaseUrl, ORIGIN: 'http://127.0.0.1:1', ...env } as NodeJS.ProcessEnv,
		stdio: ['ignore', 'pipe', 'pipe']
	});
	child.stdout?.on('data', (d) => (output += d));
	child.stderr?.on('data', (d) => (output += d));
	const log = () => output;
	await until('the worker to be ready', async () => {
		if (child.exitCode !== null) throw new Error(`the worker exited (${child.exitCode}):\n${output}`);
		return output.includes('ready') ? true : undefined;
	}, 60_000, log);
	return {
		child,
		log,
		async stop() {
			if (child.exitCode === null && child.signalCode === null) {
				const exited = new Promise((r) => child.once('exit', r));
				child.kill('SIGTERM');
				await exited;
			}
		}
	};
}

/** The environment the built app gets in this suite: adapter-node's body limit as in production. */
export const trustAppEnv = { ...appEnv, BODY_SIZE_LIMIT: '6M' };
export { serverEnv };

export const DEMO_ROLES = ['viewer', 'engineer', 'lead', 'admin'] as const;
export type DemoRole = (typeof DEMO_ROLES)[number];

/** A signed-in client for each demo user, each from its own client address (rate limits). */
export async function demoSessions(url: string): Promise<Record<DemoRole, HttpClient>> {
	const sessions = {} as Record<DemoRole, HttpClient>;
	let n = 10;
	for (const role of DEMO_ROLES) {
		const client = new HttpClient(url);
		const response = await client.post('/signin?/password', { email: `${role}@headroom.test`, password: 'headroom-demo', next: '/' }, {
			headers: { [appEnv.ADDRESS_HEADER]: `192.0.2.${n++}` }
		});
		if (response.status !== 303) await signIn(client, `${role}@headroom.test`); // fails with the reason
		sessions[role] = client;
	}
	return sessions;
}

/** A TCP port accepting connections (or not). */
export function portOpen(port: number): Promise<boolean> {
	return new Promise((res) => {
		const socket = connect({ host: '127.0.0.1', port });
		socket.once('connect', () => {
			socket.destroy();
			res(true);
		});
		socket.once('error', () => res(false));
	});
}

export interface PrivateS3 {
	endpoint: string;
	port: number;
	/** Stops the fake (SIGKILL: the store vanishes, as in a crash); its files stay. */
	stop(): Promise<void>;
	/** Starts it again on the same port over the same files. */
	start(): Promise<void>;
	/** SIGSTOP / SIGCONT: a store that still accepts connections but never answers. */
	pause(): void;
	resume(): void;
	running(): boolean;
}

/** An S3 fake of this test's own (scripts/s3-fake.ts), so it can be stopped and started again. */
export async function startPrivateS3(dir: string, bucket = 'headroom'): Promise<PrivateS3> {
	const port = await freePort();
	let child: ChildProcess | undefined;
	const start = async () => {
		child = spawn(process.execPath, ['--import', 'tsx', 'scripts/s3-fake.ts', '--port', String(port), '--dir', dir, '--bucket', bucket], {
			cwd: root,
			env: { ...process.env, S3_EVENTS_FORWARD_URL: '' } as NodeJS.ProcessEnv,
			stdio: 'ignore'
		});
		const started = child;
		await until('the private S3 fake', async () => {
			if (started.exitCode !== null) throw new Error(`the S3 fake exited (${started.exitCode})`);
			return (await portOpen(port)) ? true : undefined;
		}, 30_000);
	};
	await start();
	return {
		endpoint: `http://127.0.0.1:${port}`,
		port,
		async stop() {
			const c = child;
			if (!c || c.exitCode !== null || c.signalCode !== null) return;
			const exited = new Promise((r) => c.once('exit', r));
			c.kill('SIGKILL');
			await exited;
		},
		start,
		pause: () => child?.kill('SIGSTOP'),
		resume: () => child?.kill('SIGCONT'),
		running: () => !!child && child.exitCode === null && child.signalCode === null
	};
}
