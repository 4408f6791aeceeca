/**
 * Bulk registration of loops from CSV: a preview that checks every row against the same rules
 * as a single create (and against the other rows), then a commit that writes all rows in one
 * transaction or none. Columns: product, class, key, name, owner (e-mail), tags ("a; b"), note.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { LoopClassSchema, LoopSchema, ProductSchema, UserSchema } from '../db/entities';
import { atLeast } from '../../auth/roles';
import { Invalid, TooLarge } from '../errors';
import { loopSchema } from '../../registry/schemas';
import { CsvError, parseCsv } from '../../registry/csv';
import { demandRole, fromDbError, type Actor } from './common';
import { loopSnapshot, recordAudit } from './audit';
import { dedupe } from './loops';

export const IMPORT_COLUMNS = ['product', 'class', 'key', 'name', 'owner', 'tags', 'note'] as const;
const REQUIRED = ['product', 'class', 'key', 'name'] as const;
export const MAX_IMPORT_ROWS = 2000;
export const MAX_IMPORT_BYTES = 1_000_000;

export interface ImportRowError {
	field: string;
	message: string;
}
export interface ImportRow {
	line: number;
	product: string;
	class: string;
	key: string;
	name: string;
	owner: string;
	tags: string[];
	note: string;
	errors: ImportRowError[];
}
export interface ImportPreview {
	rows: ImportRow[];
	valid: number;
	invalid: number;
}

function readRows(text: string): ImportRow[] {
	if (new TextEncoder().encode(text).length > MAX_IMPORT_BYTES) {
		throw new TooLarge(`The file is over ${MAX_IMPORT_BYTES / 1_000_000} MB; split it.`);
	}
	let records;
	try {
		records = parseCsv(text);
	} catch (error) {
		if (error instanceof CsvError)
			throw new Invalid(`Line ${error.line}: ${error.message}`, 'file');
		throw error;
	}
	if (!records.length)
		throw new Invalid('The file is empty: it needs a header line and one line per loop.', 'file');
	const header = records[0].fields.map((h) => h.trim().toLowerCase());
	const unknown = header.filter((h) => !(IMPORT_COLUMNS as readonly string[]).includes(h));
	if (unknown.length)
		throw new Invalid(
			`Unknown column ${unknown.join(', ')}; the columns are ${IMPORT_COLUMNS.join(', ')}.`,
			'file'
		);
	const missing = REQUIRED.filter((c) => !header.includes(c));
	if (missing.length)
		throw new Invalid(`Missing column ${missing.join(', ')} in the header line.`, 'file');
	const body = records.slice(1);
	if (!body.length) throw new Invalid('The file has a header but no loops.', 'file');
	if (body.length > MAX_IMPORT_ROWS)
		throw new TooLarge(`At most ${MAX_IMPORT_ROWS} loops per import.`);
	return body.map((r) => {
		const get = (c: string) =>
			header.includes(c) ? (r.fields[header.indexOf(c)] ?? '').trim() : '';
		const errors: ImportRowError[] = [];
		if (r.fields.length !== header.length) {
			errors.push({
				field: 'line',
				message: `${r.fields.length} fields where the header has ${header.length}.`
			});
		}
		return {
			line: r.line,
			product: get('product'),
			class: get('class'),
			key: get('key'),
			name: get('name'),
			owner: get('owner').toLowerCase(),
			tags: get('tags')
				.split(/[;|]/)
				.map((t) => t.trim())
				.filter(Boolean),
			note: get('note'),
			errors
		};
	});
}

/** Check every row; nothing is written. */
export async function previewImport(
	em: EntityManager,
	actor: Actor,
	text: string
): Promise<ImportPreview> {
	demandRole(actor, 'engineer', 'import loops');
	const rows = readRows(text);
	const products = new Map((await em.find(ProductSchema, {})).map((p) => [p.key, p]));
	const classes = new Map((await em.find(LoopClassSchema, {})).map((c) => [c.key, c]));
	const users = new Map((await em.find(UserSchema, { active: true })).map((u) => [u.email, u]));
	const existing = new Set(
		(await em.find(LoopSchema, {}, { populate: ['product'] })).map(
			(l) => `${l.product.key}/${l.key}`
		)
	);
	const seen = new Map<string, number>();
	for (const row of rows) {
		const parsed = loopSchema.safeParse({ ...row, owner: row.owner || actor.email });
		if (!parsed.success) {
			for (const issue of parsed.error.issues)
				row.errors.push({
					field: issue.path.map(String).join('.') || 'line',
					message: issue.message
				});
		}
		if (row.product && !products.has(row.product))
			row.errors.push({ field: 'product', message: `No product ${row.product}.` });
		if (row.class && !classes.has(row.class))
			row.errors.push({ field: 'class', message: `No loop class ${row.class}.` });
		const ownerEmail = row.owner || actor.email;
		if (!users.has(ownerEmail))
			row.errors.push({ field: 'owner', message: `No active user ${ownerEmail}.` });
		else if (!atLeast(users.get(ownerEmail)!.role, 'engineer')) {
			row.errors.push({
				field: 'owner',
				message: `${ownerEmail} is a viewer; loop owners need the engineer role or higher.`
			});
		} else if (ownerEmail !== actor.email && !atLeast(actor.role, 'lead')) {
			row.errors.push({
				field: 'owner',
				message: 'Engineers import loops they own; leave owner blank or use your e-mail.'
			});
		}
		const id = `${row.product}/${row.key}`;
		if (existing.has(id))
			row.errors.push({ field: 'key', message: `${row.product} already has a loop ${row.key}.` });
		if (seen.has(id))
			row.errors.push({ field: 'key', message: `Same product and key as line ${seen.get(id)}.` });
		else seen.set(id, row.line);
	}
	const invalid = rows.filter((r) => r.errors.length).length;
	return { rows, valid: rows.length - invalid, invalid };
}

/** Write every row, or none: a file with any bad row is refused whole (fix it and preview again). */
export async function commitImport(
	em: EntityManager,
	actor: Actor,
	text: string
): Promise<{ created: number }> {
	const preview = await previewImport(em, actor, text);
	const bad = preview.rows.find((r) => r.errors.length);
	if (bad)
		throw new Invalid(
			`Line ${bad.line}: ${bad.errors[0].message} (${preview.invalid} rows need fixing).`,
			bad.errors[0].field
		);
	const products = new Map((await em.find(ProductSchema, {})).map((p) => [p.key, p.id]));
	const classes = new Map((await em.find(LoopClassSchema, {})).map((c) => [c.key, c.id]));
	const users = new Map((await em.find(UserSchema, { active: true })).map((u) => [u.email, u.id]));
	await em
		.transactional(async (tx) => {
			const now = new Date();
			const loops = preview.rows.map((row) =>
				tx.create(LoopSchema, {
					product: tx.getReference(ProductSchema, products.get(row.product)!),
					loopClass: tx.getReference(LoopClassSchema, classes.get(row.class)!),
					owner: tx.getReference(UserSchema, users.get(row.owner || actor.email)!),
					key: row.key,
					name: row.name,
					tags: dedupe(row.tags),
					note: row.note,
					verdict: 'empty',
					createdAt: now,
					updatedAt: now
				})
			);
			await tx.flush();
			for (const loop of loops) {
				recordAudit(tx, {
					actorId: actor.id,
					action: 'loop.create',
					entityType: 'loop',
					entityId: loop.id,
					after: { ...loopSnapshot(loop), via: 'csv import' }
				});
			}
		})
		// Someone registered one of these keys between the preview and this commit.
		.catch((error) => fromDbError(error, { loop_product_key_unique: 'key' }));
	return { created: preview.rows.length };
}
