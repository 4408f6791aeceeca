import { randomUUID } from 'node:crypto';
import { LockMode } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { OneTimeLinkSchema, UserSchema, type LinkPurpose, type User } from '../db/entities';
import { appOrigin } from '../config';
import { randomValue, sha256 } from './secrets';

export const LINK_TTL_MINUTES: Record<LinkPurpose, number> = {
	invitation: 7 * 24 * 60,
	// Short: a reset link in a mailbox is a password waiting to be taken.
	password_reset: 60
};

export function linkUrl(value: string): string {
	return `${appOrigin()}/reset/${value}`;
}

/**
 * A new single-use link for this person and purpose; older unused ones stop working, so only
 * the latest e-mail's link does. Returns the value to mail (its hash is what is stored).
 */
export async function issueLink(
	em: EntityManager,
	input: { userId: string; purpose: LinkPurpose; createdBy: string | null }
): Promise<string> {
	const now = new Date();
	await em.nativeUpdate(OneTimeLinkSchema, { user: input.userId, purpose: input.purpose, usedAt: null }, { usedAt: now });
	const value = randomValue();
	em.create(OneTimeLinkSchema, {
		id: randomUUID(),
		user: em.getReference(UserSchema, input.userId),
		purpose: input.purpose,
		tokenHash: sha256(value),
		createdAt: now,
		expiresAt: new Date(now.getTime() + LINK_TTL_MINUTES[input.purpose] * 60_000),
		createdBy: input.createdBy ? em.getReference(UserSchema, input.createdBy) : null
	});
	await em.flush();
	return value;
}

export interface UsableLink {
	purpose: LinkPurpose;
	user: User;
}

/** The link's purpose and person if it can still be used; null otherwise (the reason is nobody's business). */
export async function findUsableLink(em: EntityManager, value: string, lock = false): Promise<UsableLink | null> {
	if (!/^[\w-]{20,100}$/.test(value)) return null;
	const link = await em.findOne(
		OneTimeLinkSchema,
		{ tokenHash: sha256(value) },
		lock ? { lockMode: LockMode.PESSIMISTIC_WRITE } : {}
	);
	if (!link || link.usedAt || link.expiresAt.getTime() <= Date.now()) return null;
	const user = await em.findOne(UserSchema, { id: link.user.id }, { populate: ['passwordHash'] });
	if (!user || !user.active) return null;
	if (lock) link.usedAt = new Date();
	return { purpose: link.purpose, user };
}

/** Mark the link used (inside the caller's transaction, row-locked so it works exactly once). */
export function consumeLink(em: EntityManager, value: string): Promise<UsableLink | null> {
	return findUsableLink(em, value, true);
}
