/**
 * How cases are told apart in the plots: a colour and a dash pattern each, so the legend reads
 * without colour too. Colours are the theme's variables (light and dark).
 */
const COLOURS = [
	'var(--hr-brand)',
	'var(--hr-accent)',
	'var(--hr-verdict-unstable)',
	'var(--hr-verdict-pending)',
	'var(--hr-verdict-rejected)',
	'var(--hr-ink-soft)'
];
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

export const visible = (sel: CaseSelection, index: number) =>
	!sel.only || sel.highlight === null || sel.highlight === index;
export const dimmed = (sel: CaseSelection, index: number) =>
	sel.highlight !== null && sel.highlight !== index;

/** A read-out cursor: one point of one case. */
export interface Cursor {
	c: number;
	i: number;
}

/**
 * The cursor after a key press on a focused plot (arrows step along the active case's points,
 * Shift by ten, Home/End to the ends, Escape clears it); `undefined` when the key is not ours.
 */
export function keyCursor(
	e: KeyboardEvent,
	responses: readonly { points: readonly unknown[] }[],
	active: number,
	cursor: Cursor | null
): Cursor | null | undefined {
	const c = responses[active] ? active : 0;
	const n = responses[c]?.points.length ?? 0;
	if (!n) return undefined;
	const step = e.shiftKey ? 10 : 1;
	const i = cursor && cursor.c === c ? cursor.i : Math.floor(n / 2);
	if (e.key === 'Escape') return null;
	let next: number;
	if (e.key === 'ArrowRight' || e.key === 'ArrowUp') next = Math.min(n - 1, i + step);
	else if (e.key === 'ArrowLeft' || e.key === 'ArrowDown') next = Math.max(0, i - step);
	else if (e.key === 'Home') next = 0;
	else if (e.key === 'End') next = n - 1;
	else return undefined;
	e.preventDefault();
	return { c, i: next };
}

/** The curves to draw, the highlighted one last (on top). */
export function drawOrder<T extends { index: number }>(
	curves: readonly T[],
	sel: CaseSelection
): T[] {
	const front = (i: number) => (sel.highlight === i ? 1 : 0);
	return curves
		.filter((c) => visible(sel, c.index))
		.sort((a, b) => front(a.index) - front(b.index));
}
