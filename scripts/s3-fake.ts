// Local stand-in for S3: s3rver on loopback with one bucket, plus what a real bucket's event
// notification would do: POST each object-created record set to the app's storage-event endpoint.
//   tsx scripts/s3-fake.ts --port 4569 --dir .data/s3 [--bucket headroom]
// Env: S3_EVENTS_FORWARD_URL (forwarding off when unset), STORAGE_EVENTS_SECRET (sent as
// x-headroom-storage-secret). Credentials are s3rver's fixed S3RVER / S3RVER.
import { mkdirSync } from 'node:fs';
import { resolve } from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { parseArgs } from 'node:util';
import S3rver from 's3rver';

const { values } = parseArgs({
	options: {
		port: { type: 'string', default: '4569' },
		dir: { type: 'string', default: '.data/s3' },
		bucket: { type: 'string', default: process.env.S3_BUCKET ?? 'headroom' }
	}
});
const port = Number(values.port);
const directory = resolve(values.dir!);
const bucket = values.bucket!;
const forwardUrl = process.env.S3_EVENTS_FORWARD_URL;
const secret = process.env.STORAGE_EVENTS_SECRET;

// Browsers upload straight to the store with presigned PUTs, so the bucket must answer CORS.
const cors = `<CORSConfiguration><CORSRule>
<AllowedOrigin>*</AllowedOrigin>
<AllowedMethod>GET</AllowedMethod><AllowedMethod>PUT</AllowedMethod><AllowedMethod>POST</AllowedMethod><AllowedMethod>HEAD</AllowedMethod>
<AllowedHeader>*</AllowedHeader><ExposeHeader>ETag</ExposeHeader><MaxAgeSeconds>3000</MaxAgeSeconds>
</CORSRule></CORSConfiguration>`;

// Real S3 URL-encodes keys in notifications (space as '+'); do the same so the app's decoding
// is exercised as in production.
const encodeKey = (key: string) =>
	encodeURIComponent(key).replace(/%2F/g, '/').replace(/%20/g, '+');

const RETRY_DELAYS_MS = [500, 1_000, 2_000, 4_000, 8_000, 15_000, 15_000, 15_000];

async function forward(records: S3rver.S3EventRecord[]): Promise<void> {
	if (!forwardUrl) return;
	const body = JSON.stringify({ Records: records });
	const what = records.map((r) => `${r.eventName} ${r.s3.object.key}`).join(', ');
	const headers: Record<string, string> = { 'content-type': 'application/json' };
	if (secret) headers['x-headroom-storage-secret'] = secret;
	for (let attempt = 0; ; attempt++) {
		let problem: string;
		try {
			const response = await fetch(forwardUrl, {
				method: 'POST',
				headers,
				body,
				signal: AbortSignal.timeout(10_000)
			});
			if (response.ok) return;
			problem = `HTTP ${response.status}`;
			// 4xx is the app's considered answer (bad secret, bad payload): retrying won't change it.
			if (response.status < 500) break;
		} catch (err) {
			// Typically ECONNREFUSED while the web server is still starting.
			problem = ((err as Error).cause as Error | undefined)?.message ?? (err as Error).message;
		}
		if (attempt >= RETRY_DELAYS_MS.length) {
			console.error(`gave up forwarding ${what} to ${forwardUrl}: ${problem}`);
			return;
		}
		await sleep(RETRY_DELAYS_MS[attempt]);
	}
	console.error(`${forwardUrl} refused ${what}`);
}

mkdirSync(directory, { recursive: true });
const server = new S3rver({
	address: '127.0.0.1',
	port,
	directory,
	silent: true,
	vhostBuckets: false,
	configureBuckets: [{ name: bucket, configs: [cors] }]
});
server.on('event', (event) => {
	const created = event.Records.filter((r) => r.eventName.startsWith('ObjectCreated:'));
	if (!created.length) return;
	void forward(
		created.map((r) => ({
			...r,
			s3: { ...r.s3, object: { ...r.s3.object, key: encodeKey(r.s3.object.key) } }
		}))
	);
});

await server.run();
console.log(
	`S3 fake on http://127.0.0.1:${port} (bucket ${bucket}, data ${directory})` +
		(forwardUrl ? `, forwarding object-created events to ${forwardUrl}` : '')
);

let closing = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
	process.on(signal, () => {
		if (closing) return;
		closing = true;
		// Pending forwards are dropped: nobody is left to receive them.
		void server.close().finally(() => process.exit(0));
	});
}
