/** How a lead hears that loops of their classes got worse (owners always get immediate mail). */
export const VERDICT_MAIL_MODES = ['immediate', 'digest'] as const;
export type VerdictMailMode = (typeof VERDICT_MAIL_MODES)[number];
