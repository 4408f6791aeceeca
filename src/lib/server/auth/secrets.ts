import { createHash, randomBytes } from 'node:crypto';

/** sha-256 as hex: how link and API token values are stored (never the values themselves). */
export function sha256(value: string): string {
	return createHash('sha256').update(value, 'utf8').digest('hex');
}

/** 32 random bytes, URL-safe: unguessable, so one fast hash suffices (no salt, no argon2). */
export function randomValue(): string {
	return randomBytes(32).toString('base64url');
}

export const TOKEN_PREFIX = 'hr_';

/** A new API token value; the prefix lets secret scanners and people recognise it. */
export function newTokenValue(): string {
	return TOKEN_PREFIX + randomValue();
}
