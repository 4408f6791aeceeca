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
	/** Longest one store call may take, retries included (S3_TIMEOUT_MS, default 30 s). */
	timeoutMs: number;
}

export function s3Settings(): S3Settings {
	return {
		endpoint: process.env.S3_ENDPOINT || undefined,
		region: process.env.S3_REGION || 'us-east-1',
		bucket: required('S3_BUCKET'),
		accessKeyId: required('S3_ACCESS_KEY_ID'),
		secretAccessKey: required('S3_SECRET_ACCESS_KEY'),
		// Path-style addressing is what MinIO and the local fake need; AWS accepts it too.
		forcePathStyle: (process.env.S3_FORCE_PATH_STYLE ?? 'true') !== 'false',
		timeoutMs: Number(process.env.S3_TIMEOUT_MS) > 0 ? Number(process.env.S3_TIMEOUT_MS) : 30_000
	};
}

/**
 * Does the web server keep loop counts, pages of the loop list and bearer tokens until the
 * registry changes (db/registry-changes.ts)? HEADROOM_REGISTRY_CACHE=off makes every request
 * read them afresh (bench:web compares both).
 */
export function registryCacheEnabled(): boolean {
	return process.env.HEADROOM_REGISTRY_CACHE !== 'off';
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

/** The public URL users reach; links in e-mails point here. adapter-node reads the same variable. */
export function appOrigin(): string {
	return (process.env.ORIGIN || `http://127.0.0.1:${process.env.PORT || 3000}`).replace(/\/$/, '');
}

// Only ever used outside production: sessions signed with it are worthless anywhere else.
const DEVELOPMENT_AUTH_SECRET = 'headroom-development-only-secret-not-for-production';

/** Signs and encrypts session cookies. Required in production: refusing to start beats forgeable sessions. */
export function authSecret(): string {
	const secret = process.env.AUTH_SECRET;
	if (secret) {
		if (isProduction() && secret.length < 32) {
			throw new Error('AUTH_SECRET must be at least 32 characters (openssl rand -base64 33).');
		}
		return secret;
	}
	if (isProduction()) {
		throw new Error('AUTH_SECRET is not set: it is required when NODE_ENV=production (see .env.example).');
	}
	return DEVELOPMENT_AUTH_SECRET;
}

export interface OidcSettings {
	issuer: string;
	clientId: string;
	clientSecret: string;
	/** Shown on the sign-in button, e.g. the company's IdP name. */
	name: string;
}

/** Single sign-on through a generic OpenID Connect provider; off unless OIDC_ISSUER is set. */
export function oidcSettings(): OidcSettings | undefined {
	const issuer = process.env.OIDC_ISSUER;
	if (!issuer) return undefined;
	return {
		// Kept exactly as given: the id token's `iss` must match it character for character.
		issuer,
		clientId: required('OIDC_CLIENT_ID'),
		clientSecret: required('OIDC_CLIENT_SECRET'),
		name: process.env.OIDC_NAME || 'Company single sign-on'
	};
}

function positiveNumber(name: string): number | undefined {
	const raw = process.env[name];
	if (raw === undefined || raw === '') return undefined;
	const value = Number(raw);
	if (!Number.isFinite(value) || value < 1) throw new Error(`Environment variable ${name} must be a number of seconds ≥ 1, not "${raw}".`);
	return value;
}

/**
 * Seconds a compute job may stay active before pg-boss takes its worker for dead and retries it
 * (HEADROOM_COMPUTE_EXPIRE_SECONDS, default 60). Applied to the queue when a worker starts.
 */
export function computeJobExpirySeconds(): number {
	return positiveNumber('HEADROOM_COMPUTE_EXPIRE_SECONDS') ?? 60;
}

/** How often workers run pg-boss's maintenance, which expires lost jobs (HEADROOM_JOB_MAINTENANCE_SECONDS; pg-boss's 120 s). */
export function jobMaintenanceSeconds(): number | undefined {
	return positiveNumber('HEADROOM_JOB_MAINTENANCE_SECONDS');
}

/** When the daily verdict digest goes out (HEADROOM_DIGEST_CRON, cron in UTC; default 06:00). */
export function digestCron(): string {
	return process.env.HEADROOM_DIGEST_CRON || '0 6 * * *';
}

/**
 * Test-only fault points (HEADROOM_TEST_FAULTS, comma-separated names, see jobs/faults.ts).
 * Never honoured with NODE_ENV=production, whatever the variable says.
 */
export function testFaults(): string[] {
	const raw = process.env.HEADROOM_TEST_FAULTS;
	if (!raw || isProduction()) return [];
	return raw.split(',').map((s) => s.trim()).filter(Boolean);
}
