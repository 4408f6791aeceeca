// Port helpers: free ports for the test runner, and an early, clear refusal when a fixed port
// of `npm start` is taken (instead of a service dying later with EADDRINUSE in its own words).
import { createServer } from 'node:net';

export const HOST = '127.0.0.1';

/** A port the kernel just handed out on loopback; free for the moment we return it. */
export function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const server = createServer();
		server.unref();
		server.once('error', reject);
		server.listen(0, HOST, () => {
			const address = server.address();
			server.close(() => {
				if (address && typeof address === 'object') resolve(address.port);
				else reject(new Error('could not read the port of a loopback listener'));
			});
		});
	});
}

export function isPortFree(port: number, host = HOST): Promise<boolean> {
	return new Promise((resolve) => {
		const server = createServer();
		server.unref();
		server.once('error', () => resolve(false));
		server.listen({ port, host, exclusive: true }, () => server.close(() => resolve(true)));
	});
}

export interface PortClaim {
	service: string;
	port: number;
	/** The variable that moves this service elsewhere, quoted in the error. */
	envVar: string;
}

/** A port of a process that was just killed stays taken for a moment: allow a short grace. */
async function freeSoon(port: number, graceMs: number): Promise<boolean> {
	const deadline = Date.now() + graceMs;
	for (;;) {
		if (await isPortFree(port)) return true;
		if (Date.now() >= deadline) return false;
		await new Promise((resolve) => setTimeout(resolve, 200));
	}
}

export async function assertPortsFree(claims: PortClaim[], graceMs = 3_000): Promise<void> {
	const busy: string[] = [];
	for (const claim of claims) {
		if (!(await freeSoon(claim.port, graceMs))) {
			busy.push(`port ${claim.port} (${claim.service}) is in use: free it or set ${claim.envVar}`);
		}
	}
	if (busy.length) throw new Error(busy.join('; '));
}

export function parsePort(name: string, fallback: number): number {
	const raw = process.env[name];
	if (raw === undefined || raw === '') return fallback;
	const port = Number(raw);
	if (!Number.isInteger(port) || port < 1 || port > 65535) {
		throw new Error(`${name}=${raw} is not a TCP port number`);
	}
	return port;
}
