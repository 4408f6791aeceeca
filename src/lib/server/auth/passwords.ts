import { hash, verify } from '@node-rs/argon2';

// Argon2id with the library's defaults (19 MiB, 2 passes): OWASP's minimum recommendation.

export function hashPassword(password: string): Promise<string> {
	return hash(password);
}

// Verified against when the account is unknown or has no password, so those answers take as
// long as a wrong password for a real account and timing does not reveal which e-mails exist.
let decoy: Promise<string> | undefined;

/** True when `password` matches `stored`; always spends one argon2 verification. */
export async function verifyPassword(stored: string | null | undefined, password: string): Promise<boolean> {
	if (!stored) {
		decoy ??= hash('decoy password that never matches anything');
		await verify(await decoy, password).catch(() => false);
		return false;
	}
	try {
		return await verify(stored, password);
	} catch {
		// A malformed hash in the database is a failed sign-in, not a crash.
		return false;
	}
}
