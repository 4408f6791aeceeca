import { describe, expect, it } from 'vitest';
import { isHttpError, isRedirect } from '@sveltejs/kit';
import { requireRole, requireScope, requireUser } from '../../../src/lib/server/auth/guard';
import { safeNext } from '../../../src/lib/server/auth/next';
import { Forbidden, Unauthenticated } from '../../../src/lib/server/errors';
import type { Role, Scope } from '../../../src/lib/auth/roles';

function event(path: string, user: { role: Role } | null, scopes: Scope[] = [], method = 'GET') {
	return {
		url: new URL(`http://headroom.test${path}`),
		request: new Request(`http://headroom.test${path}`, { method }),
		locals: {
			user: user && { id: 'u1', email: 'a@headroom.test', name: 'A', ...user },
			scopes,
			requestId: 'r'
		}
	};
}

function thrown(run: () => unknown): unknown {
	try {
		run();
	} catch (error) {
		return error;
	}
	throw new Error('expected the guard to throw');
}

describe('guards on pages', () => {
	it('send anonymous visitors to /signin with the way back', () => {
		const error = thrown(() => requireUser(event('/loops?class=current', null)));
		expect(isRedirect(error) && error.status === 303 && error.location).toBe('/signin?next=%2Floops%3Fclass%3Dcurrent');
	});

	it('drop the action query of a form post from the way back', () => {
		const error = thrown(() => requireUser(event('/users?/invite', null, [], 'POST')));
		expect(isRedirect(error) && error.location).toBe('/signin?next=%2Fusers');
	});

	it('answer 403 for a role below the one required', () => {
		const error = thrown(() => requireRole(event('/users', { role: 'lead' }), 'admin'));
		expect(isHttpError(error) && error.status).toBe(403);
	});

	it('let the right role and any higher one through', () => {
		expect(requireRole(event('/requirements', { role: 'lead' }), 'lead').role).toBe('lead');
		expect(requireRole(event('/requirements', { role: 'admin' }), 'lead').role).toBe('admin');
	});
});

describe('guards on API routes', () => {
	it('throw the domain errors api() maps to 401 and 403', () => {
		expect(thrown(() => requireUser(event('/api/loops', null)))).toBeInstanceOf(Unauthenticated);
		expect(thrown(() => requireRole(event('/api/users', { role: 'viewer' }), 'admin'))).toBeInstanceOf(Forbidden);
	});

	it('check the request’s scopes, not just the role', () => {
		// An engineer's read-only token: the role could upload, this request may not.
		expect(thrown(() => requireScope(event('/api/revisions', { role: 'engineer' }, ['read']), 'upload'))).toBeInstanceOf(Forbidden);
		expect(requireScope(event('/api/revisions', { role: 'engineer' }, ['read', 'upload']), 'upload').role).toBe('engineer');
	});
});

describe('where sign-in returns to', () => {
	it('keeps paths on this site', () => {
		expect(safeNext('/loops/abc?tab=history')).toBe('/loops/abc?tab=history');
	});

	it.each(['https://evil.test', '//evil.test/x', '/\\evil.test', 'javascript:alert(1)', '/\tevil', '', null, '/signin?next=/x', '/reset/abc'])(
		'refuses %j',
		(next) => {
			expect(safeNext(next)).toBe('/');
		}
	);
});
