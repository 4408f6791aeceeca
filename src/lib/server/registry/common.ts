/**
 * Shared pieces of the registry services: who is acting, input parsing into domain errors,
 * paging, and the mapping of constraint violations the database caught into field errors.
 */
import type { z } from 'zod';
import {
	CheckConstraintViolationException,
	ForeignKeyConstraintViolationException,
	UniqueConstraintViolationException
} from '@mikro-orm/core';
import { atLeast, type Role } from '../../auth/roles';
import { Conflict, Forbidden, Invalid } from '../errors';

/** The signed-in user as App.Locals carries it. */
export interface Actor {
	id: string;
	email: string;
	name: string;
	role: Role;
}

export function demandRole(actor: Actor, role: Role, what: string): void {
	if (!atLeast(actor.role, role)) throw new Forbidden(`Only a ${role} or higher may ${what}.`);
}

/** Parse with zod; the first issue becomes an Invalid naming its field (`relaxed.minPhaseMarginDeg`). */
export function parseInput<S extends z.ZodType>(schema: S, value: unknown): z.output<S> {
	const parsed = schema.safeParse(value);
	if (parsed.success) return parsed.data;
	const issue = parsed.error.issues[0];
	const path = issue.path.map(String).join('.') || undefined;
	const message =
		issue.code === 'unrecognized_keys'
			? `Unknown field${issue.keys.length > 1 ? 's' : ''}: ${issue.keys.join(', ')}.`
			: issue.code === 'invalid_type' && issue.input === undefined
				? 'This field is required.'
				: issue.message;
	throw new Invalid(message, issue.code === 'unrecognized_keys' ? issue.keys[0] : path);
}

export interface Paging {
	page: number;
	pageSize: number;
}
export interface PageOf<T> {
	items: T[];
	total: number;
	page: number;
	pageSize: number;
}

export const MAX_PAGE_SIZE = 200;

/** `page` (from 1) and `pageSize` (1–200) from a query string; junk is a 400, not a default. */
export function pagingFrom(params: URLSearchParams, defaultSize = 50): Paging {
	const read = (name: string, fallback: number, max: number) => {
		const raw = params.get(name);
		if (raw === null || raw === '') return fallback;
		const n = Number(raw);
		if (!Number.isInteger(n) || n < 1 || n > max) {
			throw new Invalid(`${name} must be a whole number from 1 to ${max}.`, name);
		}
		return n;
	};
	return {
		page: read('page', 1, 1_000_000),
		pageSize: read('pageSize', defaultSize, MAX_PAGE_SIZE)
	};
}

export const offsetOf = (p: Paging) => (p.page - 1) * p.pageSize;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export const isUuid = (value: string) => UUID.test(value);

export const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

/**
 * Turn a constraint the database enforced into the domain error a person can act on. Inputs are
 * validated first, so these mostly catch races (two people taking the same key at once).
 */
export function fromDbError(error: unknown, fields: Record<string, string> = {}): never {
	const text = error instanceof Error ? error.message : '';
	const constraint = Object.keys(fields).find((name) => text.includes(name));
	if (error instanceof UniqueConstraintViolationException) {
		throw new Conflict('That key is already taken.', constraint ? fields[constraint] : undefined);
	}
	if (error instanceof CheckConstraintViolationException) {
		throw new Invalid(
			'A value is outside what the registry accepts.',
			constraint ? fields[constraint] : undefined
		);
	}
	if (error instanceof ForeignKeyConstraintViolationException) {
		throw new Invalid(
			'A referenced record does not exist.',
			constraint ? fields[constraint] : undefined
		);
	}
	throw error;
}

export interface UserRef {
	id: string;
	name: string;
	email: string;
}
export const userRef = (u: { id: string; name: string; email: string }): UserRef => ({
	id: u.id,
	name: u.name,
	email: u.email
});
