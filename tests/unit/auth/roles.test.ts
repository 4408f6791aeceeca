import { describe, expect, it } from 'vitest';
import { atLeast, effectiveScopes, isRole, ROLES, scopesForRole } from '../../../src/lib/auth/roles';

describe('roles', () => {
	it('orders viewer < engineer < lead < admin', () => {
		expect(ROLES).toEqual(['viewer', 'engineer', 'lead', 'admin']);
		expect(atLeast('lead', 'engineer')).toBe(true);
		expect(atLeast('lead', 'lead')).toBe(true);
		expect(atLeast('engineer', 'lead')).toBe(false);
		expect(atLeast('viewer', 'engineer')).toBe(false);
		expect(atLeast('admin', 'viewer')).toBe(true);
	});

	it('lets viewers read and everyone else also upload', () => {
		expect(scopesForRole('viewer')).toEqual(['read']);
		for (const role of ['engineer', 'lead', 'admin'] as const) expect(scopesForRole(role)).toEqual(['read', 'upload']);
	});

	it('shrinks a token’s scopes to what its owner’s role allows today', () => {
		expect(effectiveScopes(['read', 'upload'], 'viewer')).toEqual(['read']);
		expect(effectiveScopes(['upload'], 'viewer')).toEqual([]);
		expect(effectiveScopes(['upload', 'read'], 'lead')).toEqual(['read', 'upload']);
		expect(effectiveScopes(['read'], 'admin')).toEqual(['read']);
	});

	it('recognises role names only', () => {
		expect(isRole('lead')).toBe(true);
		expect(isRole('superuser')).toBe(false);
		expect(isRole(undefined)).toBe(false);
	});
});
