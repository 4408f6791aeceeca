import {
	CreateBucketCommand,
	DeleteObjectCommand,
	GetObjectCommand,
	HeadBucketCommand,
	HeadObjectCommand,
	ListObjectsV2Command,
	PutObjectCommand,
	S3Client
} from '@aws-sdk/client-s3';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';
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

/** An object's body as a web stream (for answers that pass it on without buffering). */
export async function getObjectStream(key: string): Promise<{ body: ReadableStream; size: number | null }> {
	const out = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
	if (!out.Body) throw new Error(`object ${key} has no body`);
	return { body: out.Body.transformToWebStream(), size: out.ContentLength ?? null };
}

export async function deleteObject(key: string): Promise<void> {
	await s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key }));
}

/** Size and time of an object, or null when there is none. */
export async function headObject(key: string): Promise<{ size: number; modified: Date } | null> {
	try {
		const out = await s3().send(new HeadObjectCommand({ Bucket: bucket(), Key: key }));
		return { size: out.ContentLength ?? 0, modified: out.LastModified ?? new Date() };
	} catch (error) {
		const status = (error as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;
		if (status === 404) return null;
		throw error;
	}
}

/** Every object under a prefix (paged through), for the reconcile job. */
export async function listObjects(prefix: string): Promise<{ key: string; size: number; modified: Date }[]> {
	const out: { key: string; size: number; modified: Date }[] = [];
	let token: string | undefined;
	do {
		const page = await s3().send(
			new ListObjectsV2Command({ Bucket: bucket(), Prefix: prefix, ContinuationToken: token })
		);
		for (const o of page.Contents ?? []) {
			if (o.Key) out.push({ key: o.Key, size: o.Size ?? 0, modified: o.LastModified ?? new Date() });
		}
		token = page.IsTruncated ? page.NextContinuationToken : undefined;
	} while (token);
	return out;
}

/** A presigned PUT for one object key; the key is always ours, never the client's. */
export async function presignPut(key: string, seconds: number): Promise<string> {
	// S3 cannot bound the size of a presigned PUT; the size is checked when the object arrives.
	return getSignedUrl(s3(), new PutObjectCommand({ Bucket: bucket(), Key: key }), { expiresIn: seconds });
}
