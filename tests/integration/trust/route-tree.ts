/**
 * Every way in, read from src/routes: each page (its load, answered to GET), each form action
 * (POST ?/name, or the default action) and each method a +server.ts exports. The role × route
 * matrix is generated from this list, so a route added later shows up in it without anyone
 * remembering to add a test.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import ts from 'typescript';

const ROUTES = resolve(import.meta.dirname, '../../../src/routes');
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'];

export interface Entry {
	/** "GET /loops/[id]", "POST /loops/[id]?/archive", "POST /loops/new" (default action). */
	key: string;
	method: string;
	routeId: string;
	kind: 'page' | 'action' | 'endpoint';
	/** The ?/name of a named action, '' for the default one. */
	action?: string;
}

function files(dir = ROUTES): string[] {
	return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
		const path = join(dir, e.name);
		if (e.isDirectory()) return files(path);
		return /^\+(page\.server|page\.svelte|server)\.(ts|js|svelte)$/.test(e.name) ? [path] : [];
	});
}

function routeIdOf(file: string): string {
	const parts = relative(ROUTES, file).split('/').slice(0, -1).filter((p) => !/^\(.*\)$/.test(p));
	return '/' + parts.join('/');
}

const exported = (n: ts.Node) => ts.canHaveModifiers(n) && !!ts.getModifiers(n)?.some((m) => m.kind === ts.SyntaxKind.ExportKeyword);

function unwrap(node: ts.Expression): ts.Expression {
	while (ts.isSatisfiesExpression(node) || ts.isAsExpression(node) || ts.isParenthesizedExpression(node)) node = node.expression;
	return node;
}

/** The names a module exports, and the keys of its `actions` object. */
function exportsOf(source: string): { names: string[]; actions: string[] } {
	const sf = ts.createSourceFile('route.ts', source, ts.ScriptTarget.Latest, true);
	const names: string[] = [];
	const actions: string[] = [];
	for (const s of sf.statements) {
		if (ts.isFunctionDeclaration(s) && exported(s) && s.name) names.push(s.name.text);
		if (ts.isVariableStatement(s) && exported(s)) {
			for (const d of s.declarationList.declarations) {
				if (!ts.isIdentifier(d.name)) continue;
				names.push(d.name.text);
				const init = d.initializer && unwrap(d.initializer);
				if (d.name.text === 'actions' && init && ts.isObjectLiteralExpression(init)) {
					for (const p of init.properties) {
						if (p.name && (ts.isIdentifier(p.name) || ts.isStringLiteral(p.name))) actions.push(p.name.text);
						else actions.push('?');
					}
				}
			}
		}
		if (ts.isExportDeclaration(s)) names.push('export { … }');
	}
	return { names, actions };
}

export function routeTree(): Entry[] {
	const entries = new Map<string, Entry>();
	const add = (e: Omit<Entry, 'key'>) => {
		const key = `${e.method} ${e.routeId}${e.action ? `?/${e.action}` : ''}`;
		entries.set(key, { ...e, key });
	};
	for (const file of files()) {
		const routeId = routeIdOf(file);
		if (file.endsWith('+page.svelte')) {
			add({ method: 'GET', routeId, kind: 'page' });
			continue;
		}
		const { names, actions } = exportsOf(readFileSync(file, 'utf8'));
		if (file.includes('+server.')) {
			for (const m of METHODS) if (names.includes(m)) add({ method: m, routeId, kind: 'endpoint' });
			for (const n of names) if (!METHODS.includes(n) && /^[A-Z]+$|^fallback$|export/.test(n)) add({ method: n, routeId, kind: 'endpoint' });
		} else {
			add({ method: 'GET', routeId, kind: 'page' });
			for (const a of actions) add({ method: 'POST', routeId, kind: 'action', action: a === 'default' ? '' : a });
		}
	}
	return [...entries.values()].sort((a, b) => a.key.localeCompare(b.key));
}

/** A concrete URL for a route id: every parameter filled with a value that names nothing. */
export function concretePath(entry: Entry): string {
	const path = entry.routeId.replace(/\[(\.\.\.)?(\w+)(=\w+)?\]/g, (_, _rest, name: string) =>
		name === 'id' ? '00000000-0000-4000-8000-000000000000' : `no-such-${name}`
	);
	return entry.kind === 'action' && entry.action ? `${path}?/${entry.action}` : path;
}
