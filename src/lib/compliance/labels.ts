/**
 * Verdict words shared by the UI (VerdictBadge) and the report renderers in the worker, which
 * cannot import a .svelte module. Words first: shapes and colours only repeat what they say.
 */
import type { Verdict } from './judge';

export const VERDICT_LABELS: Record<Verdict, string> = {
	compliant: 'Compliant',
	noncompliant: 'Non-compliant',
	covered: 'Covered',
	unstable: 'Unstable',
	pending: 'Pending',
	rejected: 'Rejected',
	empty: 'No revision'
};

export const VERDICT_HINTS: Record<Verdict, string> = {
	compliant: 'Meets every target of its class',
	noncompliant: 'Falls short of at least one target',
	covered: 'Falls short, but every shortfall is covered by an active deviation',
	unstable: 'The closed loop is unstable',
	pending: 'The latest revision is being computed',
	rejected: 'The latest revision could not be read',
	empty: 'No model revision uploaded yet'
};
