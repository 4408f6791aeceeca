import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import { UserSchema, type User } from '../db/entities';
import { recordAudit, userSnapshot } from '../audit/audit';
import { normalizeEmail } from './email';
import { verifyPassword } from './passwords';
import { beginAttempt, markSucceeded } from './rate-limit';

/** What Auth.js keeps of a user: only the id goes into the session token. */
export interface SignedInUser {
	id: string;
	email: string;
	name: string;
}

export type PasswordOutcome =
	| { ok: true; user: SignedInUser }
	| { ok: false; reason: 'invalid' | 'rate_limited' };

const signedIn = (user: User): SignedInUser => ({ id: user.id, email: user.email, name: user.name });

/**
 * Check an e-mail and password. Unknown address, wrong password, no password set, deactivated:
 * all give the same answer after the same argon2 work, so the answer says nothing about which
 * addresses have accounts.
 */
export async function signInWithPassword(
	em: EntityManager,
	input: { email: string; password: string; address: string }
): Promise<PasswordOutcome> {
	const email = normalizeEmail(input.email);
	const attempt = await beginAttempt(em, email, input.address);
	if (attempt.limited) return { ok: false, reason: 'rate_limited' };
	const user = await em.findOne(UserSchema, { email }, { populate: ['passwordHash'] });
	const matches = await verifyPassword(user?.passwordHash, input.password);
	if (!user || !matches || !user.active) return { ok: false, reason: 'invalid' };
	await markSucceeded(em, attempt);
	user.lastSignInAt = new Date();
	await em.flush();
	return { ok: true, user: signedIn(user) };
}

export interface SsoProfile {
	email?: string | null;
	emailVerified?: boolean | null;
	name?: string | null;
}

/**
 * Match a single sign-on identity to our user by e-mail, creating a viewer the first time.
 * An admin who wants someone to start with another role invites the address first; the
 * invitation created the user with that role, so it is found here. Null refuses the sign-in.
 */
export async function signInWithSso(em: EntityManager, profile: SsoProfile): Promise<SignedInUser | null> {
	// An address the IdP itself has not verified could belong to anyone.
	if (!profile.email || profile.emailVerified === false) return null;
	const email = normalizeEmail(profile.email);
	for (let tries = 0; ; tries++) {
		try {
			return await em.fork().transactional(async (tx) => {
				let user = await tx.findOne(UserSchema, { email });
				if (!user) {
					user = tx.create(UserSchema, {
						id: randomUUID(),
						email,
						name: profile.name?.trim().slice(0, 200) || email.split('@')[0],
						role: 'viewer',
						active: true,
						createdAt: new Date()
					});
					recordAudit(tx, {
						actorId: user.id,
						action: 'user.created_by_sso',
						entityType: 'user',
						entityId: user.id,
						after: userSnapshot(user)
					});
				}
				if (!user.active) return null;
				user.lastSignInAt = new Date();
				return signedIn(user);
			});
		} catch (error) {
			// Two first sign-ins of the same person at once: the second finds the first's row.
			if (error instanceof UniqueConstraintViolationException && tries === 0) continue;
			throw error;
		}
	}
}
