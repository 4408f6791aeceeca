import type { Verdict } from '$lib/compliance/judge';

/** Worst first: what needs attention leads, wherever verdicts are counted. */
export const VERDICTS_WORST_FIRST: Verdict[] = ['unstable', 'noncompliant', 'rejected', 'pending', 'covered', 'compliant', 'empty'];
