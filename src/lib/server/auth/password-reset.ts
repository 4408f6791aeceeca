import { LockMode } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { OneTimeLinkSchema, UserSchema } from '../db/entities';
import { recordAudit } from '../audit/audit';
import { Invalid } from '../errors';
import { sendMail } from '../mail/transport';
import { passwordResetMail } from '../mail/templates/auth';
import { normalizeEmail } from './email';
import { consumeLink, issueLink, LINK_TTL_MINUTES, linkUrl } from './links';
import { hashPassword } from './passwords';

const RESETS_PER_HOUR = 3;

/**
 * Mail a reset link if the address belongs to an active account. The caller answers the same
 * whatever happens here and does not wait for it (see /reset), so neither the words nor the
 * time of the answer tell whether the address is known.
 */
export async function requestPasswordReset(em: EntityManager, email: string): Promise<void> {
	const issued = await em.transactional(async (tx) => {
		// Row lock: requests for one address queue here, so the hourly bound holds under bursts.
		const user = await tx.findOne(UserSchema, { email: normalizeEmail(email) }, { lockMode: LockMode.PESSIMISTIC_WRITE });
		if (!user || !user.active) return null;
		// Bound the mail anyone can make us send to someone else's inbox.
		const recent = await tx.count(OneTimeLinkSchema, {
			user: user.id,
			purpose: 'password_reset',
			createdAt: { $gt: new Date(Date.now() - 3600_000) }
		});
		if (recent >= RESETS_PER_HOUR) return null;
		const value = await issueLink(tx, { userId: user.id, purpose: 'password_reset', createdBy: null });
		return { to: user.email, value };
	});
	if (!issued) return;
	await sendMail(passwordResetMail({ to: issued.to, url: linkUrl(issued.value), minutes: LINK_TTL_MINUTES.password_reset }));
}

/**
 * Set a password through an invitation or reset link; the link is used up, and every session
 * signed in before now ends (whoever had the old password is out).
 */
export async function setPasswordWithLink(
	em: EntityManager,
	value: string,
	password: string
): Promise<{ email: string; purpose: 'invitation' | 'password_reset' }> {
	// Hashing takes a while: do it before taking the row lock.
	const passwordHash = await hashPassword(password);
	return em.transactional(async (tx) => {
		const link = await consumeLink(tx, value);
		if (!link) throw new Invalid('This link has expired or was already used. Ask for a new one.');
		const { user } = link;
		const before = { passwordSet: Boolean(user.passwordHash) };
		user.passwordHash = passwordHash;
		user.sessionsValidFrom = new Date();
		recordAudit(tx, {
			actorId: user.id,
			action: link.purpose === 'invitation' ? 'user.invitation_accepted' : 'user.password_reset',
			entityType: 'user',
			entityId: user.id,
			before,
			after: { passwordSet: true }
		});
		return { email: user.email, purpose: link.purpose };
	});
}
