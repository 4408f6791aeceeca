/** The loop list's query parameters that filter (the rest sort and page); shared by server and page. */
export const LOOP_FILTER_KEYS = ['q', 'product', 'class', 'owner', 'verdict', 'failing', 'tag', 'changedSince', 'archived'] as const;
export type LoopFilterKey = (typeof LOOP_FILTER_KEYS)[number];
