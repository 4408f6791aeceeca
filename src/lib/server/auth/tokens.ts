import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiTokenSchema, UserSchema, type ApiToken, type User } from '../db/entities';
import { effectiveScopes, scopesForRole, type Scope } from '../../auth/roles';
import { recordAudit } from '../audit/audit';
import { Forbidden, Invalid, NotFound } from '../errors';
import { preparedRows } from '../db/prepared';
import { emOf, remembered, type EmSource } from '../db/registry-changes';
import { newTokenValue, sha256, TOKEN_PREFIX } from './secrets';

export interface TokenRow {
	id: string;
	name: string;
	hint: string;
	scopes: Scope[];
	createdAt: Date;
	lastUsedAt: Date | null;
	revokedAt: Date | null;
}

const row = (t: ApiToken): TokenRow => ({
	id: t.id,
	name: t.name,
	hint: t.hint,
	scopes: [...t.scopes],
	createdAt: t.createdAt,
	lastUsedAt: t.lastUsedAt ?? null,
	revokedAt: t.revokedAt ?? null
});

const tokenAudit = (t: ApiToken) => ({
	name: t.name,
	scopes: [...t.scopes],
	hint: t.hint,
	revoked: Boolean(t.revokedAt)
});

export async function listTokens(em: EntityManager, ownerId: string): Promise<TokenRow[]> {
	const tokens = await em.find(
		ApiTokenSchema,
		{ owner: ownerId },
		{ orderBy: { createdAt: 'desc' } }
	);
	return tokens.map(row);
}

/**
 * Create a token and return its value, which is never stored and so cannot be shown again.
 * `value` lets the demo seed choose its published values; everything else gets a random one.
 */
export async function createToken(
	em: EntityManager,
	owner: Pick<User, 'id' | 'role'>,
	input: { name: string; scopes: Scope[]; value?: string }
): Promise<{ token: TokenRow; value: string }> {
	const allowed = scopesForRole(owner.role);
	const refused = input.scopes.filter((s) => !allowed.includes(s));
	if (refused.length)
		throw new Forbidden(`Your role cannot grant the ${refused.join(', ')} scope.`);
	if (!input.scopes.length) throw new Invalid('Choose at least one scope.', 'scopes');
	const value = input.value ?? newTokenValue();
	const token = em.create(ApiTokenSchema, {
		id: randomUUID(),
		owner: em.getReference(UserSchema, owner.id),
		name: input.name,
		tokenHash: sha256(value),
		hint: value.slice(0, 8),
		scopes: [...new Set(input.scopes)],
		createdAt: new Date()
	});
	recordAudit(em, {
		actorId: owner.id,
		action: 'api_token.created',
		entityType: 'api_token',
		entityId: token.id,
		after: tokenAudit(token)
	});
	await em.flush();
	return { token: row(token), value };
}

/** Owners revoke their own tokens; revoking twice is harmless. */
export async function revokeToken(
	em: EntityManager,
	ownerId: string,
	tokenId: string
): Promise<void> {
	const token = await em.findOne(ApiTokenSchema, { id: tokenId, owner: ownerId });
	if (!token) throw new NotFound('No such token.');
	if (token.revokedAt) return;
	const before = tokenAudit(token);
	token.revokedAt = new Date();
	recordAudit(em, {
		actorId: ownerId,
		action: 'api_token.revoked',
		entityType: 'api_token',
		entityId: token.id,
		before,
		after: tokenAudit(token)
	});
	await em.flush();
}

export interface TokenPrincipal {
	user: Pick<User, 'id' | 'email' | 'name' | 'role'>;
	scopes: Scope[];
}

interface TokenLookup {
	id: string;
	scopes: Scope[];
	used_at: number | null;
	user_id: string;
	email: string;
	name: string;
	role: User['role'];
}

/** A token found, as kept between changes: `usedAt` is its "last used" stamp (ms), as last written. */
interface KnownToken {
	id: string;
	principal: TokenPrincipal;
	usedAt: number;
}

const STAMP_EVERY_MS = 60_000;

async function lookupToken(em: EntityManager, hash: string): Promise<KnownToken | undefined> {
	const [found] = await preparedRows<TokenLookup>(
		em,
		`select t.id, t.scopes, (extract(epoch from t.last_used_at) * 1000)::float8 as used_at,
		        u.id as user_id, u.email, u.name, u.role
		 from api_token t join app_user u on u.id = t.owner_id
		 where t.token_hash = ? and t.revoked_at is null and u.active`,
		[hash]
	);
	if (!found) return undefined;
	return {
		id: found.id,
		principal: {
			user: { id: found.user_id, email: found.email, name: found.name, role: found.role },
			scopes: effectiveScopes(found.scopes, found.role)
		},
		usedAt: found.used_at ?? 0
	};
}

/**
 * The user and scopes a bearer value stands for, or null. A revoked token, a deactivated owner
 * and an unknown value all fail alike. Scopes shrink with the owner's current role.
 *
 * Every API call comes through here. In the web server a token found is kept until the registry
 * next changes (db/registry-changes.ts: api_token and app_user notify, so a revocation, a
 * deactivation or a role change ends it), and values not found are never kept. Otherwise it is
 * one indexed query (no entity hydration). "Last used" is written at most once a minute per
 * token: it needs no finer grain, and a busy pipeline should not turn every API read into a write.
 */
export async function resolveToken(em: EmSource, value: string): Promise<TokenPrincipal | null> {
	if (!value.startsWith(TOKEN_PREFIX) || value.length > 200) return null;
	const hash = sha256(value);
	const known = await remembered(em, `token ${hash}`, async () =>
		lookupToken(await emOf(em), hash)
	);
	if (!known) return null;
	if (Date.now() - known.usedAt >= STAMP_EVERY_MS) {
		known.usedAt = Date.now();
		const conn = (await emOf(em)).getConnection();
		await conn.execute(
			`update api_token set last_used_at = now() where id = ? and (last_used_at is null or last_used_at < now() - interval '1 minute')`,
			[known.id]
		);
	}
	return known.principal;
}
