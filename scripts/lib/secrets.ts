// Secrets for a local install: generated once and kept under the data folder, so sessions and
// signed links survive a restart. An explicitly set environment variable wins.
import { randomBytes } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';

export function randomSecret(bytes = 32): string {
	return randomBytes(bytes).toString('base64url');
}

export function persistentSecret(file: string, envValue?: string): string {
	if (envValue) return envValue;
	if (existsSync(file)) {
		const saved = readFileSync(file, 'utf8').trim();
		if (saved) return saved;
	}
	const secret = randomSecret();
	writeFileSync(file, `${secret}\n`, { mode: 0o600 });
	return secret;
}
