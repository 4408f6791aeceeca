import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { VERDICTS, type Judgement, type Verdict } from '../../../compliance/judge';
import { UserSchema } from './user';
import { ProductSchema } from './product';
import { LoopClassSchema } from './loop-class';

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
		wcModulusMargin: p.double().nullable()
	},
	uniques: [{ name: 'loop_product_key_unique', properties: ['product', 'key'] }],
	indexes: [{ properties: ['loopClass'] }, { properties: ['owner'] }, { properties: ['verdict'] }],
	checks: [{ name: 'loop_key_format', expression: "key ~ '^[a-z0-9][a-z0-9._-]*$'" }]
});

export type Loop = InferEntity<typeof LoopSchema>;
