import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { UserSchema } from './user';
import { LoopSchema } from './loop';

/**
 * Life of a revision: `awaiting-upload` (a presigned upload was handed out, the object has not
 * arrived), `queued` (object stored, compute job enqueued in the same transaction), `computing`,
 * then `computed` or `rejected` (the model was refused: message and path inside the file kept).
 */
export const REVISION_STATES = ['awaiting-upload', 'queued', 'computing', 'computed', 'rejected'] as const;
export type RevisionState = (typeof REVISION_STATES)[number];

export const RevisionSchema = defineEntity({
	name: 'Revision',
	tableName: 'revision',
	properties: {
		id: p.uuid().primary(),
		loop: p.manyToOne(LoopSchema),
		number: p.integer(),
		state: p.enum([...REVISION_STATES]).default('queued'),
		// Named by the server, never from the client's file name.
		objectKey: p.string().length(200).unique(),
		fileName: p.string().length(255),
		sizeBytes: p.integer().nullable(),
		sha256: p.string().length(64).nullable(),
		note: p.text().default(''),
		uploadedBy: p.manyToOne(UserSchema),
		uploadedAt: p.datetime().defaultRaw('now()'),
		computedAt: p.datetime().nullable(),
		errorMessage: p.text().nullable(),
		errorPath: p.text().nullable(),
		/** Compute attempts so far (a job retried after a crash counts again). */
		attempts: p.integer().default(0),
		/** The last failure of the compute job itself (storage down, worker crash), for the UI. */
		jobError: p.text().nullable()
	},
	uniques: [{ name: 'revision_loop_number_unique', properties: ['loop', 'number'] }],
	indexes: [
		{ name: 'revision_loop_sha_index', properties: ['loop', 'sha256'] },
		{ name: 'revision_state_index', properties: ['state'] },
		// The dashboard's `changedSince` filter: revisions uploaded since a moment, by loop.
		{ name: 'revision_uploaded_at_loop_index', properties: ['uploadedAt', 'loop'] }
	],
	checks: [
		{ name: 'revision_number_positive', expression: 'number > 0' },
		{ name: 'revision_size_nonnegative', expression: 'size_bytes is null or size_bytes >= 0' },
		{
			name: 'revision_rejected_has_error',
			expression: "(state = 'rejected') = (error_message is not null)"
		}
	]
});

export type Revision = InferEntity<typeof RevisionSchema>;
