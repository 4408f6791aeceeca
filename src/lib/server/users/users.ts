import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { UserSchema, type Role, type User } from '../db/entities';
import { recordAudit, userSnapshot } from '../audit/audit';
import { Conflict, NotFound } from '../errors';
import { sendMail } from '../mail/transport';
import { invitationMail } from '../mail/templates/auth';
import { normalizeEmail } from '../auth/email';
import { issueLink, LINK_TTL_MINUTES, linkUrl } from '../auth/links';

export type UserStatus = 'active' | 'invited' | 'deactivated';

export interface UserRow {
	id: string;
	email: string;
	name: string;
	role: Role;
	status: UserStatus;
	createdAt: Date;
	lastSignInAt: Date | null;
}

function status(user: User): UserStatus {
	if (!user.active) return 'deactivated';
	return !user.passwordHash && !user.lastSignInAt ? 'invited' : 'active';
}

const toRow = (u: User): UserRow => ({
	id: u.id,
	email: u.email,
	name: u.name,
	role: u.role,
	status: status(u),
	createdAt: u.createdAt,
	lastSignInAt: u.lastSignInAt ?? null
});

export async function listUsers(em: EntityManager): Promise<UserRow[]> {
	const users = await em.find(UserSchema, {}, { orderBy: { email: 'asc' }, populate: ['passwordHash'] });
	return users.map(toRow);
}

async function findUser(em: EntityManager, userId: string): Promise<User> {
	// The hash is loaded only to tell invited people (no password yet) from members.
	const user = await em.findOne(UserSchema, { id: userId }, { populate: ['passwordHash'] });
	if (!user) throw new NotFound('No such user.');
	return user;
}

async function mailInvitation(em: EntityManager, user: User, actor: User): Promise<boolean> {
	const value = await issueLink(em, { userId: user.id, purpose: 'invitation', createdBy: actor.id });
	try {
		const days = LINK_TTL_MINUTES.invitation / (24 * 60);
		await sendMail(invitationMail({ to: user.email, inviter: actor.name, role: user.role, url: linkUrl(value), days }));
		return true;
	} catch (error) {
		// The invitation stands; the admin sees the warning and can send it again.
		console.error(`invitation mail to ${user.email} failed:`, error);
		return false;
	}
}

/**
 * Invite someone: the account exists at once with its role (so a first single sign-on finds it)
 * and a link to choose a password is mailed.
 */
export async function inviteUser(
	em: EntityManager,
	actorId: string,
	input: { email: string; name: string; role: Role }
): Promise<{ user: UserRow; mailed: boolean }> {
	const email = normalizeEmail(input.email);
	const actor = await findUser(em, actorId);
	if (await em.findOne(UserSchema, { email })) {
		throw new Conflict('Someone with this e-mail already has an account.', 'email');
	}
	const user = em.create(UserSchema, {
		id: randomUUID(),
		email,
		name: input.name.trim() || email.split('@')[0],
		role: input.role,
		active: true,
		createdAt: new Date()
	});
	recordAudit(em, { actorId, action: 'user.invited', entityType: 'user', entityId: user.id, after: userSnapshot(user) });
	await em.flush();
	const mailed = await mailInvitation(em, user, actor);
	return { user: toRow(user), mailed };
}

export async function resendInvitation(em: EntityManager, actorId: string, userId: string): Promise<boolean> {
	const actor = await findUser(em, actorId);
	const user = await findUser(em, userId);
	if (status(user) !== 'invited') throw new Conflict('This person has already joined.');
	recordAudit(em, { actorId, action: 'user.invitation_resent', entityType: 'user', entityId: user.id });
	await em.flush();
	return mailInvitation(em, user, actor);
}

/** Nobody may remove the last way to administer Headroom. */
async function assertAnotherAdmin(em: EntityManager, user: User): Promise<void> {
	if (user.role !== 'admin' || !user.active) return;
	const others = await em.count(UserSchema, { role: 'admin', active: true, id: { $ne: user.id } });
	if (others === 0) throw new Conflict('Headroom needs at least one active admin.');
}

export async function changeRole(em: EntityManager, actorId: string, userId: string, role: Role): Promise<void> {
	await em.transactional(async (tx) => {
		const user = await findUser(tx, userId);
		if (user.role === role) return;
		if (role !== 'admin') await assertAnotherAdmin(tx, user);
		const before = userSnapshot(user);
		user.role = role;
		recordAudit(tx, { actorId, action: 'user.role_changed', entityType: 'user', entityId: user.id, before, after: userSnapshot(user) });
	});
}

/**
 * Deactivation takes effect on the next request: sessions and tokens are checked against the
 * user row every time, and sessions from before stay void even after reactivation.
 */
export async function setActive(em: EntityManager, actorId: string, userId: string, active: boolean): Promise<void> {
	await em.transactional(async (tx) => {
		const user = await findUser(tx, userId);
		if (user.active === active) return;
		if (!active) {
			if (user.id === actorId) throw new Conflict('You cannot deactivate your own account.');
			await assertAnotherAdmin(tx, user);
			user.sessionsValidFrom = new Date();
		}
		const before = userSnapshot(user);
		user.active = active;
		recordAudit(tx, {
			actorId,
			action: active ? 'user.reactivated' : 'user.deactivated',
			entityType: 'user',
			entityId: user.id,
			before,
			after: userSnapshot(user)
		});
	});
}
