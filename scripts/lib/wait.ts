// Readiness checks. Each error names the service, what was awaited and the last thing seen,
// so "did not come up" says which one and why.
import { connect } from 'node:net';
import { setTimeout as sleep } from 'node:timers/promises';
import { describeExit, type Child } from './processes';

export interface WaitOptions {
	timeoutMs?: number;
	intervalMs?: number;
	/** Stop waiting as soon as this child exits: no point polling a dead service. */
	child?: Child;
}

/** Polls `probe` until it returns true; any other return value is kept as the last status. */
export async function waitUntil(
	service: string,
	what: string,
	probe: () => Promise<true | string>,
	{ timeoutMs = 30_000, intervalMs = 250, child }: WaitOptions = {}
): Promise<void> {
	const deadline = Date.now() + timeoutMs;
	let last: string;
	let dead: string | undefined;
	void child?.exited.then((exit) => (dead = describeExit(exit)));
	for (;;) {
		if (dead) throw new Error(`${service} exited (${dead}) before ${what}`);
		try {
			const result = await probe();
			if (result === true) return;
			last = result;
		} catch (err) {
			last =
				err instanceof Error
					? ((err.cause as Error | undefined)?.message ?? err.message)
					: String(err);
		}
		if (Date.now() >= deadline) {
			throw new Error(
				`${service} did not come up: ${what} within ${timeoutMs / 1000}s (last: ${last})`
			);
		}
		await sleep(intervalMs);
	}
}

function tcpProbe(host: string, port: number): Promise<true | string> {
	return new Promise((resolve) => {
		const socket = connect({ host, port });
		const done = (result: true | string) => {
			socket.destroy();
			resolve(result);
		};
		socket.setTimeout(1_000, () => done('connect timed out'));
		socket.once('connect', () => done(true));
		socket.once('error', (err) => done(err.message));
	});
}

export function waitForTcp(service: string, host: string, port: number, options?: WaitOptions) {
	return waitUntil(
		service,
		`accepting connections on ${host}:${port}`,
		() => tcpProbe(host, port),
		options
	);
}

/** Waits for a 2xx answer (or whatever `ok` accepts); the last body is quoted on timeout. */
export function waitForHttp(
	service: string,
	url: string,
	options: WaitOptions & { ok?: (status: number) => boolean } = {}
) {
	const ok = options.ok ?? ((status: number) => status >= 200 && status < 300);
	return waitUntil(
		service,
		`answering ${url}`,
		async () => {
			const response = await fetch(url, { signal: AbortSignal.timeout(5_000), redirect: 'manual' });
			if (ok(response.status)) return true;
			const body = (await response.text()).replace(/\s+/g, ' ').slice(0, 200);
			return `HTTP ${response.status} ${body}`.trim();
		},
		{ intervalMs: 500, ...options }
	);
}
