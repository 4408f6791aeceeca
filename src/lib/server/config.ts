/**
 * Server configuration read from the environment, in one place. Pure (no SvelteKit import) so the
 * worker, scripts and tests share it. Values are read when asked for, not at import time: the test
 * runner sets variables per process and `vite build` must not need any of them.
 */

function required(name: string): string {
	const value = process.env[name];
	if (!value) throw new Error(`Environment variable ${name} is not set (see .env.example).`);
	return value;
}

export function databaseUrl(): string {
	return required('DATABASE_URL');
}

export interface S3Settings {
	endpoint: string | undefined;
	region: string;
	bucket: string;
	accessKeyId: string;
	secretAccessKey: string;
	forcePathStyle: boolean;
}

export function s3Settings(): S3Settings {
	return {
		endpoint: process.env.S3_ENDPOINT || undefined,
		region: process.env.S3_REGION || 'us-east-1',
		bucket: required('S3_BUCKET'),
		accessKeyId: required('S3_ACCESS_KEY_ID'),
		secretAccessKey: required('S3_SECRET_ACCESS_KEY'),
		// Path-style addressing is what MinIO and the local fake need; AWS accepts it too.
		forcePathStyle: (process.env.S3_FORCE_PATH_STYLE ?? 'true') !== 'false'
	};
}

export function smtpUrl(): string {
	return process.env.SMTP_URL || 'smtp://127.0.0.1:1025';
}

export function mailFrom(): string {
	return process.env.MAIL_FROM || 'Headroom <no-reply@headroom.test>';
}

export function isProduction(): boolean {
	return process.env.NODE_ENV === 'production';
}
