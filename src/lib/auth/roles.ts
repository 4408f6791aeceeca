/**
 * Roles and API scopes, shared by the server, the entities and the pages (no imports, so the
 * browser bundle can use it). The order of ROLES is the order of privilege.
 */
export const ROLES = ['viewer', 'engineer', 'lead', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const SCOPES = ['read', 'upload'] as const;
export type Scope = (typeof SCOPES)[number];

export function isRole(value: unknown): value is Role {
	return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

/** viewer < engineer < lead < admin. */
export function atLeast(role: Role, minimum: Role): boolean {
	return ROLES.indexOf(role) >= ROLES.indexOf(minimum);
}

/** What a role may do through the API: viewers read; everyone else may also upload. */
export function scopesForRole(role: Role): Scope[] {
	return role === 'viewer' ? ['read'] : ['read', 'upload'];
}

/** A token's scopes as they apply today: never more than its owner's current role allows. */
export function effectiveScopes(granted: readonly Scope[], role: Role): Scope[] {
	const allowed = scopesForRole(role);
	return SCOPES.filter((s) => granted.includes(s) && allowed.includes(s));
}
