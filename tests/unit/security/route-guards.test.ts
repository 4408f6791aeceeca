/**
 * Every load, form action and endpoint under src/routes must call a guard (requireUser,
 * requireRole, requireScope) itself, so a route added later cannot forget it. A layout's load is
 * checked too: it does not rerun on every request, so it must not be anyone's only protection,
 * and whatever it returns is visible to every page below it. Public routes are listed below,
 * each with its reason; API endpoints must also answer through api(), which turns the guards'
 * errors into the JSON contract.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

const ROUTES = resolve(import.meta.dirname, '../../../src/routes');
const GUARDS = new Set(['requireUser', 'requireRole', 'requireScope']);
const METHODS = new Set(['GET', 'POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS', 'HEAD', 'fallback']);

/** Route ids (or prefixes ending in /**) open to anonymous callers, with why. */
const PUBLIC: Record<string, string> = {
	'/': 'shell layout (current user for the header) and the public system status page',
	'/api/health': 'load balancers and the launcher probe it without credentials',
	'/api/storage-events': 'the object store calls it; it checks a shared secret instead',
	'/signin/**': 'where anonymous people sign in',
	'/signout': 'must work for a session that is no longer valid',
	'/reset/**': 'password reset and invitation links: the mailed link is the credential',
	'/auth/**': 'Auth.js callbacks (handled in hooks before any route)'
};

export interface Handler {
	name: string;
	guarded: boolean;
	usesApi: boolean;
	/** Why the handler could not be inspected (e.g. built by a helper call). */
	opaque?: string;
}

function calls(node: ts.Node, names: Set<string>): boolean {
	let found = false;
	const visit = (n: ts.Node) => {
		if (found) return;
		if (ts.isCallExpression(n)) {
			const callee = n.expression;
			const name = ts.isIdentifier(callee) ? callee.text : ts.isPropertyAccessExpression(callee) ? callee.name.text : '';
			if (names.has(name)) found = true;
		}
		ts.forEachChild(n, visit);
	};
	visit(node);
	return found;
}

function unwrap(node: ts.Expression): ts.Expression {
	while (ts.isSatisfiesExpression(node) || ts.isAsExpression(node) || ts.isParenthesizedExpression(node)) {
		node = node.expression;
	}
	return node;
}

/** The handlers a route module exports: load, each action, each HTTP method. */
export function analyse(source: string, file = 'route.ts'): Handler[] {
	const sf = ts.createSourceFile(file, source, ts.ScriptTarget.Latest, true);
	const locals = new Map<string, ts.Node>();
	for (const statement of sf.statements) {
		if (ts.isFunctionDeclaration(statement) && statement.name) locals.set(statement.name.text, statement);
		if (ts.isVariableStatement(statement)) {
			for (const d of statement.declarationList.declarations) {
				if (ts.isIdentifier(d.name) && d.initializer) locals.set(d.name.text, d.initializer);
			}
		}
	}
	const handlers: Handler[] = [];
	const inspect = (name: string, node: ts.Node | undefined) => {
		if (node && ts.isIdentifier(node)) node = locals.get(node.text);
		if (node && ts.isExpression(node)) node = unwrap(node);
		const fn = node && (ts.isArrowFunction(node) || ts.isFunctionExpression(node) || ts.isFunctionDeclaration(node) || ts.isMethodDeclaration(node));
		if (!node || !fn) {
			handlers.push({ name, guarded: false, usesApi: false, opaque: 'not a function written in this file' });
			return;
		}
		handlers.push({ name, guarded: calls(node, GUARDS), usesApi: calls(node, new Set(['api'])) });
	};
	const exported = (n: ts.Node) => ts.canHaveModifiers(n) && ts.getModifiers(n)?.some((m) => m.kind === ts.SyntaxKind.ExportKeyword);
	for (const statement of sf.statements) {
		if (ts.isFunctionDeclaration(statement) && exported(statement) && statement.name) {
			const name = statement.name.text;
			if (name === 'load' || METHODS.has(name)) inspect(name, statement);
		}
		if (ts.isVariableStatement(statement) && exported(statement)) {
			for (const d of statement.declarationList.declarations) {
				if (!ts.isIdentifier(d.name)) continue;
				const name = d.name.text;
				if (name === 'load' || METHODS.has(name)) inspect(name, d.initializer);
				if (name === 'actions') {
					const object = d.initializer && unwrap(d.initializer);
					if (!object || !ts.isObjectLiteralExpression(object)) {
						handlers.push({ name: 'actions', guarded: false, usesApi: false, opaque: 'actions is not an object literal' });
						continue;
					}
					for (const p of object.properties) {
						const key = p.name && (ts.isIdentifier(p.name) || ts.isStringLiteral(p.name)) ? p.name.text : '?';
						if (ts.isPropertyAssignment(p)) inspect(`actions.${key}`, p.initializer);
						else if (ts.isMethodDeclaration(p)) inspect(`actions.${key}`, p);
						else if (ts.isShorthandPropertyAssignment(p)) inspect(`actions.${key}`, p.name);
						else handlers.push({ name: `actions.${key}`, guarded: false, usesApi: false, opaque: 'spread or accessor' });
					}
				}
			}
		}
		if (ts.isExportDeclaration(statement)) {
			handlers.push({ name: 'export { … }', guarded: false, usesApi: false, opaque: 're-exported handlers cannot be checked' });
		}
	}
	return handlers;
}

function routeFiles(dir = ROUTES): string[] {
	return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
		const path = join(dir, entry.name);
		if (entry.isDirectory()) return routeFiles(path);
		return /^\+(page\.server|layout\.server|server)\.(ts|js)$/.test(entry.name) ? [path] : [];
	});
}

/** "/users/[id]" for src/routes/(app)/users/[id]/+page.server.ts: groups do not appear in URLs. */
function routeId(file: string): string {
	const parts = relative(ROUTES, file).split('/').slice(0, -1).filter((p) => !/^\(.*\)$/.test(p));
	return '/' + parts.join('/');
}

export function isPublic(id: string): boolean {
	return Object.keys(PUBLIC).some((pattern) =>
		pattern.endsWith('/**') ? id === pattern.slice(0, -3) || id.startsWith(pattern.slice(0, -2)) : id === pattern
	);
}

describe('route guards', () => {
	const files = routeFiles();

	it('finds the route modules it is meant to check', () => {
		const ids = files.map(routeId);
		expect(ids).toEqual(expect.arrayContaining(['/users', '/settings/tokens', '/api/me', '/signin']));
	});

	it('every load, action and endpoint outside the public list calls a guard', () => {
		const unguarded = files.flatMap((file) => {
			const id = routeId(file);
			if (isPublic(id)) return [];
			return analyse(readFileSync(file, 'utf8'), file)
				.filter((h) => !h.guarded)
				.map((h) => `${relative(ROUTES, file)} ${h.name}: ${h.opaque ?? 'calls no requireUser/requireRole/requireScope'}`);
		});
		expect(unguarded).toEqual([]);
	});

	it('every /api endpoint answers through api(), so guard errors become 401/403 JSON', () => {
		const bare = files
			.filter((file) => file.endsWith('+server.ts') && routeId(file).startsWith('/api/') && !isPublic(routeId(file)))
			.flatMap((file) => analyse(readFileSync(file, 'utf8'), file).filter((h) => !h.usesApi).map((h) => `${relative(ROUTES, file)} ${h.name}`));
		expect(bare).toEqual([]);
	});
});

describe('the checker itself', () => {
	it('spots an unguarded action next to guarded ones', () => {
		const handlers = analyse(`
			export const load = (async (event) => { requireRole(event, 'admin'); return {}; }) satisfies PageServerLoad;
			export const actions = {
				save: async (event) => { requireUser(event); },
				forgot: async ({ request }) => { await request.formData(); },
				method(event) { guard.requireScope(event, 'upload'); }
			} satisfies Actions;`);
		expect(handlers.map((h) => [h.name, h.guarded])).toEqual([
			['load', true],
			['actions.save', true],
			['actions.forgot', false],
			['actions.method', true]
		]);
	});

	it('refuses handlers it cannot see into, and endpoints that skip api()', () => {
		const handlers = analyse(`
			const handler = async (event) => api(async () => { requireUser(event); return json({}); });
			export const GET = handler;
			export const POST = wrap(async () => json({}));
			export async function DELETE(event) { requireUser(event); return new Response(null); }`);
		expect(handlers).toEqual([
			{ name: 'GET', guarded: true, usesApi: true },
			{ name: 'POST', guarded: false, usesApi: false, opaque: 'not a function written in this file' },
			{ name: 'DELETE', guarded: true, usesApi: false }
		]);
	});

	it('matches public prefixes on whole path segments only', () => {
		expect(isPublic('/reset/abc')).toBe(true);
		expect(isPublic('/reset')).toBe(true);
		expect(isPublic('/resetting')).toBe(false);
		expect(isPublic('/signout/extra')).toBe(false);
		expect(isPublic('/users')).toBe(false);
	});
});
