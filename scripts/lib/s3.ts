// Starts scripts/s3-fake.ts as a supervised child and waits until it accepts connections
// (s3rver creates the bucket before it listens, so a listening fake has the bucket).
import { join } from 'node:path';
import { HOST } from './ports';
import type { Child, Supervisor } from './processes';
import { waitForTcp } from './wait';

export const S3_ACCESS_KEY_ID = 'S3RVER';
export const S3_SECRET_ACCESS_KEY = 'S3RVER';
export const S3_REGION = 'us-east-1';

export interface S3FakeOptions {
	root: string;
	port: number;
	dir: string;
	bucket: string;
	/** Where object-created events go (the app's /api/storage-events); none when undefined. */
	forwardUrl?: string;
	storageEventsSecret?: string;
	name?: string;
}

export async function startS3Fake(supervisor: Supervisor, options: S3FakeOptions): Promise<Child> {
	const { root, port, dir, bucket, forwardUrl, storageEventsSecret } = options;
	const name = options.name ?? 's3';
	const env: NodeJS.ProcessEnv = { ...process.env, S3_BUCKET: bucket };
	delete env.S3_EVENTS_FORWARD_URL;
	if (forwardUrl) env.S3_EVENTS_FORWARD_URL = forwardUrl;
	if (storageEventsSecret) env.STORAGE_EVENTS_SECRET = storageEventsSecret;
	const child = supervisor.start({
		name,
		// One node process with tsx's loader, rather than the tsx CLI and its inner node.
		command: process.execPath,
		args: [
			'--import',
			'tsx',
			join(root, 'scripts/s3-fake.ts'),
			'--port',
			String(port),
			'--dir',
			dir,
			'--bucket',
			bucket
		],
		cwd: root,
		env
	});
	await waitForTcp('the S3 fake', HOST, port, { child, timeoutMs: 20_000 });
	return child;
}

export function s3Env(port: number, bucket: string): Record<string, string> {
	return {
		S3_ENDPOINT: `http://${HOST}:${port}`,
		S3_REGION,
		S3_BUCKET: bucket,
		S3_ACCESS_KEY_ID,
		S3_SECRET_ACCESS_KEY
	};
}
