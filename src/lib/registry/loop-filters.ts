/** The loop list's query parameters that filter (the rest sort and page); shared by server and page. */
export const LOOP_FILTER_KEYS = [
	'q',
	'product',
	'class',
	'owner',
	'verdict',
	'failing',
	'tag',
	'changedSince',
	'archived'
] as const;
export type LoopFilterKey = (typeof LOOP_FILTER_KEYS)[number];

/** Which loops a list shows by their archive state (`active` when the parameter is absent). */
export const LOOP_ARCHIVED = ['active', 'archived', 'all'] as const;
export type LoopArchived = (typeof LOOP_ARCHIVED)[number];

/** The `sort` values of the loop list (its SQL: server/registry/loop-sort-keys.ts). */
export const LOOP_SORTS = [
	'key',
	'name',
	'product',
	'class',
	'owner',
	'verdict',
	'updatedAt',
	'phaseMargin',
	'upperGainMargin',
	'delayMargin',
	'modulusMargin',
	'shortfall'
] as const;
export type LoopSort = (typeof LOOP_SORTS)[number];

export const LOOP_DIRS = ['asc', 'desc'] as const;
export type LoopDir = (typeof LOOP_DIRS)[number];
