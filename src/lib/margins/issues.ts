/**
 * Refusals: a message that names the problem, prefixed by the JSON path it concerns
 * (`blocks[1].denominator: leading coefficient is zero`), and the path on its own.
 */
import type { ModelIssue } from './types';

export type PathSegment = string | number;

export function formatPath(path: readonly PropertyKey[]): string {
	let out = '';
	for (const seg of path) {
		if (typeof seg === 'number') out += `[${seg}]`;
		else out += out === '' ? String(seg) : `.${String(seg)}`;
	}
	return out;
}

export function issue(path: readonly PropertyKey[] | string, problem: string): ModelIssue {
	const p = typeof path === 'string' ? path : formatPath(path);
	return { message: p === '' ? problem : `${p}: ${problem}`, path: p };
}

/** Thrown by the model builders; the schema refinement turns it into a zod issue. */
export class ModelError extends Error {
	readonly path: PathSegment[];
	readonly problem: string;
	constructor(path: PathSegment[], problem: string) {
		super(`${formatPath(path)}: ${problem}`);
		this.path = path;
		this.problem = problem;
	}
}
