// s3rver ships no types; this covers what scripts/s3-fake.ts uses.
declare module 's3rver' {
	import { EventEmitter } from 'node:events';

	namespace S3rver {
		interface Options {
			address?: string;
			port?: number;
			silent?: boolean;
			directory?: string;
			serviceEndpoint?: string;
			vhostBuckets?: boolean;
			resetOnClose?: boolean;
			allowMismatchedSignatures?: boolean;
			configureBuckets?: { name: string; configs?: (string | Buffer)[] }[];
		}

		/** One S3 event-notification record, as s3rver emits it on 'event'. */
		interface S3EventRecord {
			eventName: string;
			s3: { bucket: { name: string }; object: { key: string; size?: number; eTag?: string } };
			[field: string]: unknown;
		}
	}

	class S3rver extends EventEmitter {
		constructor(options?: S3rver.Options);
		run(): Promise<{ address: string; port: number }>;
		close(): Promise<void>;
		on(event: 'event', listener: (event: { Records: S3rver.S3EventRecord[] }) => void): this;
		on(event: string | symbol, listener: (...args: unknown[]) => void): this;
	}

	export = S3rver;
}
