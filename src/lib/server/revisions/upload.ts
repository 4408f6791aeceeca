/**
 * Model revisions arriving: straight uploads (web form, pipelines), presigned uploads to the
 * store, and the announcement that a presigned object arrived (client call or store event,
 * whichever comes first, exactly once). Each path ends the same way: a `queued` revision row and
 * its compute job, committed in one transaction.
 */
import { createHash, randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { MAX_MODEL_BYTES } from '../../margins';
import { atLeast } from '../../auth/roles';
import { LoopSchema, UserSchema, type Loop } from '../db/entities';
import { RevisionSchema, type Revision } from '../db/entities/revision';
import { Conflict, Forbidden, Invalid, NotFound, TooLarge, Unavailable } from '../errors';
import { recordAudit } from '../audit/audit';
import { deleteObject, headObject, presignPut, putObject } from '../storage/s3';
import { enqueueCompute } from './enqueue';
import { modelKey } from './keys';
import type { Actor } from '../registry/common';

export const PRESIGN_SECONDS = 15 * 60;
const MB = (n: number) => `${(n / 1024 / 1024).toFixed(0)} MB`;

/** Owners, leads and admins upload; other engineers only where the loop's class allows it. */
export function canUpload(actor: Actor, loop: Loop): boolean {
	if (atLeast(actor.role, 'lead')) return true;
	if (actor.role !== 'engineer') return false;
	return loop.owner.id === actor.id || loop.loopClass.openUploads === true;
}

async function lockLoop(em: EntityManager, actor: Actor, loopId: string): Promise<Loop> {
	const loop = await em.findOne(LoopSchema, { id: loopId }, { populate: ['loopClass', 'owner'] });
	if (!loop) throw new NotFound('No loop with this id.');
	if (!canUpload(actor, loop)) {
		throw new Forbidden('Only the loop owner, a lead or an admin may upload to this loop.');
	}
	if (loop.archivedAt) throw new Conflict('The loop is archived; restore it before uploading.');
	return loop;
}

function cleanFileName(name: string | undefined): string {
	// Kept only for display; never used in a key or a path.
	const base = (name ?? '').split(/[\\/]/).pop() ?? '';
	// eslint-disable-next-line no-control-regex -- stripping control characters is the point
	const clean = base.replace(/[\u0000-\u001f\u007f]/g, '').trim().slice(0, 200);
	return clean || 'model.json';
}

function cleanNote(note: string | undefined): string {
	if ((note ?? '').length > 2000) throw new Invalid('The note is longer than 2000 characters.', 'note');
	return (note ?? '').trim();
}

/** The next number for the loop, taken under a row lock so concurrent uploads never collide. */
async function nextNumber(tx: EntityManager, loopId: string): Promise<number> {
	const conn = tx.getConnection();
	const ctx = tx.getTransactionContext();
	await conn.execute('select id from loop where id = ? for update', [loopId], 'all', ctx);
	const [row] = await conn.execute<{ n: number }[]>(
		'select coalesce(max(number), 0)::int + 1 as n from revision where loop_id = ?',
		[loopId],
		'all',
		ctx
	);
	return row.n;
}

export async function findDuplicate(em: EntityManager, loopId: string, sha256: string, exceptId?: string) {
	const match = await em.findOne(
		RevisionSchema,
		{ loop: loopId, sha256, ...(exceptId ? { id: { $ne: exceptId } } : {}) },
		{ orderBy: { number: 'asc' } }
	);
	return match;
}

export interface UploadInput {
	fileName?: string;
	bytes: Uint8Array;
	note?: string;
}

/** A whole file in the request: checked, stored, then recorded with its job in one transaction. */
export async function uploadRevision(em: EntityManager, actor: Actor, loopId: string, input: UploadInput): Promise<Revision> {
	const loop = await lockLoop(em, actor, loopId);
	if (input.bytes.byteLength > MAX_MODEL_BYTES) {
		throw new TooLarge(`The file is ${MB(input.bytes.byteLength)}; the limit is ${MB(MAX_MODEL_BYTES)}. Nothing was stored.`);
	}
	const note = cleanNote(input.note);
	const sha256 = createHash('sha256').update(input.bytes).digest('hex');
	const same = await findDuplicate(em, loop.id, sha256);
	if (same) {
		throw new Conflict(`This file is identical to revision ${same.number} of this loop; nothing was stored.`, 'file');
	}
	const id = randomUUID();
	const key = modelKey(loop.id, id);
	try {
		await putObject(key, input.bytes, 'application/octet-stream');
	} catch {
		throw new Unavailable('The object store is unavailable; the file was not stored. Try again shortly.');
	}
	try {
		return await em.transactional(async (tx) => {
			const revision = tx.create(RevisionSchema, {
				id,
				loop: tx.getReference(LoopSchema, loop.id),
				number: await nextNumber(tx, loop.id),
				state: 'queued',
				objectKey: key,
				fileName: cleanFileName(input.fileName),
				sizeBytes: input.bytes.byteLength,
				sha256,
				note,
				uploadedBy: tx.getReference(UserSchema, actor.id),
				uploadedAt: new Date(),
				attempts: 0
			});
			recordAudit(tx, {
				actorId: actor.id,
				action: 'revision.upload',
				entityType: 'revision',
				entityId: id,
				after: { loop: loop.key, number: revision.number, fileName: revision.fileName, sha256 }
			});
			await tx.flush();
			await enqueueCompute(tx, id);
			return revision;
		});
	} catch (error) {
		// The row never committed: take the object back (the reconcile job catches what this misses).
		await deleteObject(key).catch(() => undefined);
		throw error;
	}
}

/** Hand out a presigned PUT for a large file; the row waits for the object to arrive. */
export async function presignRevision(
	em: EntityManager,
	actor: Actor,
	loopId: string,
	input: { fileName?: string; note?: string }
): Promise<{ revision: Revision; uploadUrl: string; expiresAt: Date }> {
	const loop = await lockLoop(em, actor, loopId);
	const note = cleanNote(input.note);
	const id = randomUUID();
	const key = modelKey(loop.id, id);
	const revision = await em.transactional(async (tx) => {
		const row = tx.create(RevisionSchema, {
			id,
			loop: tx.getReference(LoopSchema, loop.id),
			number: await nextNumber(tx, loop.id),
			state: 'awaiting-upload',
			objectKey: key,
			fileName: cleanFileName(input.fileName),
			note,
			uploadedBy: tx.getReference(UserSchema, actor.id),
			uploadedAt: new Date(),
			attempts: 0
		});
		recordAudit(tx, {
			actorId: actor.id,
			action: 'revision.presign',
			entityType: 'revision',
			entityId: id,
			after: { loop: loop.key, number: row.number, fileName: row.fileName }
		});
		return row;
	});
	const uploadUrl = await presignPut(key, PRESIGN_SECONDS);
	return { revision, uploadUrl, expiresAt: new Date(Date.now() + PRESIGN_SECONDS * 1000) };
}

export type Announcement = 'queued' | 'already' | 'unknown' | 'missing' | 'too-large';

/**
 * The object behind a presigned revision has arrived. Row lock + state check make this exactly
 * once however many times (and however concurrently) the client and the store announce it.
 */
export async function announceObject(em: EntityManager, objectKey: string): Promise<Announcement> {
	return em.transactional(async (tx) => {
		const conn = tx.getConnection();
		const ctx = tx.getTransactionContext();
		const [row] = await conn.execute<{ id: string; state: string }[]>(
			'select id, state from revision where object_key = ? for update',
			[objectKey],
			'all',
			ctx
		);
		if (!row) return 'unknown';
		if (row.state !== 'awaiting-upload') return 'already';
		const head = await headObject(objectKey);
		if (!head) return 'missing';
		if (head.size > MAX_MODEL_BYTES) {
			await conn.execute(
				`update revision set state = 'rejected', size_bytes = ?, error_message = ?, error_path = '' where id = ?`,
				[head.size, `The file is ${MB(head.size)}; the limit is ${MB(MAX_MODEL_BYTES)}.`, row.id],
				'run',
				ctx
			);
			await deleteObject(objectKey).catch(() => undefined);
			return 'too-large';
		}
		await conn.execute(`update revision set state = 'queued', size_bytes = ? where id = ?`, [head.size, row.id], 'run', ctx);
		await enqueueCompute(tx, row.id);
		return 'queued';
	});
}
