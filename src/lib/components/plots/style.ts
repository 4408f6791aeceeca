/**
 * How cases are told apart in the plots: a colour and a dash pattern each, so the legend reads
 * without colour too. Colours are the theme's variables (light and dark).
 */
const COLOURS = ['var(--hr-brand)', 'var(--hr-accent)', 'var(--hr-verdict-unstable)', 'var(--hr-verdict-pending)', 'var(--hr-verdict-rejected)', 'var(--hr-ink-soft)'];
const DASHES = ['', '7 4', '2 3', '10 3 2 3', '4 4', '1 5'];

export interface CaseStyle {
	colour: string;
	dash: string;
}

export function caseStyle(index: number): CaseStyle {
	return { colour: COLOURS[index % COLOURS.length], dash: DASHES[index % DASHES.length] };
}

/** Which cases to draw and which one is in front. */
export interface CaseSelection {
	/** Index of the highlighted case; null = all alike. */
	highlight: number | null;
	/** Draw only the highlighted case. */
	only: boolean;
}

export const visible = (sel: CaseSelection, index: number) => !sel.only || sel.highlight === null || sel.highlight === index;
export const dimmed = (sel: CaseSelection, index: number) => sel.highlight !== null && sel.highlight !== index;
