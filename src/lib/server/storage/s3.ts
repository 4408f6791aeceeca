import {
	CreateBucketCommand,
	GetObjectCommand,
	HeadBucketCommand,
	PutObjectCommand,
	S3Client
} from '@aws-sdk/client-s3';
import { s3Settings } from '../config';

let client: S3Client | undefined;

/** One S3 client per process; the same code talks to AWS, MinIO or the local fake. */
export function s3(): S3Client {
	if (!client) {
		const cfg = s3Settings();
		client = new S3Client({
			endpoint: cfg.endpoint,
			region: cfg.region,
			forcePathStyle: cfg.forcePathStyle,
			credentials: { accessKeyId: cfg.accessKeyId, secretAccessKey: cfg.secretAccessKey },
			// Without these the SDK frames streamed uploads in aws-chunked encoding, which some
			// S3-compatible stores (and the local fake) store verbatim inside the object.
			requestChecksumCalculation: 'WHEN_REQUIRED',
			responseChecksumValidation: 'WHEN_REQUIRED',
			maxAttempts: 3
		});
	}
	return client;
}

export function bucket(): string {
	return s3Settings().bucket;
}

export async function headBucket(signal?: AbortSignal): Promise<void> {
	await s3().send(new HeadBucketCommand({ Bucket: bucket() }), { abortSignal: signal });
}

export async function ensureBucket(): Promise<void> {
	try {
		await headBucket();
	} catch {
		await s3().send(new CreateBucketCommand({ Bucket: bucket() }));
	}
}

export async function putObject(key: string, body: Uint8Array | string, contentType: string) {
	await s3().send(
		new PutObjectCommand({ Bucket: bucket(), Key: key, Body: body, ContentType: contentType })
	);
}

export async function getObjectBytes(key: string): Promise<Uint8Array> {
	const out = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
	if (!out.Body) throw new Error(`object ${key} has no body`);
	return out.Body.transformToByteArray();
}
