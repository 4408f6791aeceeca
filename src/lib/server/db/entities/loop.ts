import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { VERDICTS, type Judgement, type Verdict } from '../../../compliance/judge';
import { UserSchema } from './user';
import { ProductSchema } from './product';
import { LoopClassSchema } from './loop-class';
import { SORT_INDEXES } from '../../registry/loop-sort-keys';

/**
 * One feedback loop of one product. Loops are archived, never deleted: revisions and audit
 * rows refer to them. `verdict` is the stored outcome of the latest judgement (filled by the
 * revisions feature; `empty` until a revision exists), kept on the row so lists can filter on it.
 */
export const LoopSchema = defineEntity({
	name: 'Loop',
	tableName: 'loop',
	properties: {
		id: p.uuid().primary().defaultRaw('gen_random_uuid()'),
		product: p.manyToOne(ProductSchema),
		loopClass: p.manyToOne(LoopClassSchema),
		key: p.string().length(64),
		name: p.string().length(200),
		owner: p.manyToOne(UserSchema),
		tags: p.array<string>(),
		note: p.text().default(''),
		verdict: p.enum([...VERDICTS]).default('empty' satisfies Verdict),
		archivedAt: p.datetime().nullable(),
		createdAt: p.datetime().defaultRaw('now()'),
		updatedAt: p.datetime().defaultRaw('now()'),
		// The latest judgement (src/lib/server/verdicts): what it used and its details, kept on
		// the row so dashboards filter and sort without joining reports. Plain ids, not relations:
		// a cache of the judgement; verdict_event keeps the history with real foreign keys.
		verdictDetail: p.json<Judgement>().nullable(),
		judgedRevisionId: p.uuid().nullable(),
		judgedRequirementId: p.uuid().nullable(),
		judgedAt: p.datetime().nullable(),
		verdictChangedAt: p.datetime().nullable(),
		wcPhaseMarginDeg: p.double().nullable(),
		wcUpperGainMarginDb: p.double().nullable(),
		wcDelayMarginS: p.double().nullable(),
		wcModulusMargin: p.double().nullable(),
		// Criteria the latest judgement found short of their target, covered by a deviation or
		// not (the `failing` filter), and the largest relative shortfall among them (the
		// `shortfall` sort): kept by judge-loops.ts with the judgement itself.
		failingCriteria: p.array<string>().defaultRaw(`'{}'`),
		worstShortfall: p.double().nullable(),
		// The newest revision's upload time, kept by a trigger on revision inserts (migration
		// 20261202140000_activity), so `changedSince` reads one column instead of the revisions.
		lastRevisionAt: p.datetime().nullable(),
		// The loop as GET /api/loops lists it (JSON text), written by a trigger on every insert
		// and update and on product, class and owner renames (migration 20261202190000): never
		// set it from code, and it is left out of every select unless asked for.
		listItem: p.text().lazy(true, false).nullable()
	},
	uniques: [{ name: 'loop_product_key_unique', properties: ['product', 'key'] }],
	indexes: [
		{ properties: ['loopClass'] },
		{ properties: ['owner'] },
		{ properties: ['verdict'] },
		// Dashboard filters and sorts over thousands of loops (src/lib/server/registry/loop-query.ts).
		{ name: 'loop_failing_criteria_gin', properties: ['failingCriteria'], type: 'gin' },
		{ name: 'loop_verdict_changed_at_index', properties: ['verdictChangedAt'] },
		// changedSince: an index-only scan for the OR of both columns (migration 20261202140000).
		{
			name: 'loop_changed_index',
			expression:
				'create index "loop_changed_index" on "loop" ("verdict_changed_at", "last_revision_at") where "archived_at" is null'
		},
		// One per sort and direction of the loop list (loop-sort-keys.ts).
		...SORT_INDEXES.map(({ name, sql }) => ({ name, expression: sql }))
	],
	checks: [{ name: 'loop_key_format', expression: "key ~ '^[a-z0-9][a-z0-9._-]*$'" }]
});

export type Loop = InferEntity<typeof LoopSchema>;
