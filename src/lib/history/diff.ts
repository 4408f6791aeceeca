/**
 * What changed between two revisions of a loop: every margin figure of the worst case and of each
 * operating case (before, after, change, better or worse), the stability, the cases, and the
 * model summary, with sentences such as "Phase margin fell 12.0° since revision 4". Pure: the
 * server, the API and the page all use it on results they already have.
 */
import type { MarginFigures, MarginsResult } from '../margins/types';
import type { ModelSummary } from '../margins/summary';
import { FIGURES, figureValues, type FigureInfo, type FigureKey } from './figures';
import { amount, percent, withUnit } from './format';
import { diffSummaries, type ModelChange } from './model-diff';

export type SideState = 'awaiting-upload' | 'queued' | 'computing' | 'computed' | 'rejected';

/** One revision as the diff needs it. */
export interface RevisionSide {
	number: number;
	state: SideState;
	result: MarginsResult | null;
	/** The engine's summary of the model file; null when the file could not be read. */
	summary: ModelSummary | null;
	error?: { message: string; path: string } | null;
}

export type Tone = 'better' | 'worse' | 'neutral' | 'same';

export interface FigureChange {
	key: FigureKey | 'stability';
	label: string;
	before: number | null;
	after: number | null;
	beforeText: string;
	afterText: string;
	/** after − before, when both are numbers. */
	delta: number | null;
	/** (after − before) / |before|, when both are numbers and before ≠ 0. */
	relative: number | null;
	/** How the change is told ("fell 12.0°", "became unbounded"), or null when unchanged. */
	changeText: string | null;
	tone: Tone;
	/** Worst case only: the operating case the figure came from, before and after. */
	fromBefore?: string;
	fromAfter?: string;
}

export interface CaseDiff {
	name: string;
	presence: 'both' | 'added' | 'removed';
	figures: FigureChange[];
}

export interface RevisionDiff {
	before: number;
	after: number;
	/** Sentences for the top of the view: stability first, then the worst case, cases, model. */
	sentences: { text: string; tone: Tone }[];
	/** Why margins cannot be compared (a side rejected or not computed yet); empty when they can. */
	notes: string[];
	worstCase: FigureChange[];
	cases: CaseDiff[];
	model: ModelChange[];
}

const capital = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

function nullText(info: FigureInfo, stable: boolean): string {
	if (!stable) return '— (unstable)';
	return info.whenNull === 'unbounded'
		? 'unbounded'
		: info.whenNull === 'no crossover'
			? 'no gain crossover'
			: '—';
}

const tonedBy = (info: FigureInfo, up: boolean): Tone =>
	info.better === 'neither' ? 'neutral' : up === (info.better === 'higher') ? 'better' : 'worse';

/** One figure, before and after, on stable or unstable loops. */
export function compareFigure(
	info: FigureInfo,
	before: number | null,
	after: number | null,
	stable: { before: boolean; after: boolean }
): FigureChange {
	const beforeText = before === null ? nullText(info, stable.before) : withUnit(before, info.unit);
	const afterText = after === null ? nullText(info, stable.after) : withUnit(after, info.unit);
	const base = { key: info.key, label: info.label, before, after, beforeText, afterText };
	if (before !== null && after !== null) {
		const delta = after - before;
		const relative = before !== 0 ? delta / Math.abs(before) : null;
		// Unchanged at the precision shown: a sentence about noise in the last digit helps no one.
		if (beforeText === afterText)
			return { ...base, delta, relative, changeText: null, tone: 'same' };
		const verb = info.verbs[delta > 0 ? 0 : 1];
		const by =
			info.change === 'relative' && relative !== null
				? percent(relative)
				: amount(delta, info.unit);
		return {
			...base,
			delta,
			relative,
			changeText: `${verb} ${by}`,
			tone: tonedBy(info, delta > 0)
		};
	}
	const none = { delta: null, relative: null };
	if (before === null && after === null)
		return { ...base, ...none, changeText: null, tone: 'same' };
	// Figures that vanish or appear because the loop became unstable or stable are told once, by the stability row.
	if ((after === null && !stable.after) || (before === null && !stable.before)) {
		return { ...base, ...none, changeText: null, tone: 'neutral' };
	}
	if (info.whenNull === 'unbounded') {
		return after === null
			? { ...base, ...none, changeText: 'became unbounded', tone: 'better' }
			: { ...base, ...none, changeText: `became finite (${afterText})`, tone: 'worse' };
	}
	if (info.whenNull === 'no crossover') {
		return after === null
			? { ...base, ...none, changeText: 'has no gain crossover any more', tone: 'neutral' }
			: {
					...base,
					...none,
					changeText: `appeared (${afterText}): the loop now has a gain crossover`,
					tone: 'neutral'
				};
	}
	return {
		...base,
		...none,
		changeText: after === null ? 'is no longer reported' : `is now reported (${afterText})`,
		tone: 'neutral'
	};
}

function poles(n: number) {
	return `${n} unstable closed-loop pole${n === 1 ? '' : 's'}`;
}

export function compareStability(
	before: Pick<MarginFigures, 'stable' | 'unstablePoles'>,
	after: Pick<MarginFigures, 'stable' | 'unstablePoles'>
): FigureChange {
	const text = (m: typeof before) => (m.stable ? 'stable' : `unstable (${poles(m.unstablePoles)})`);
	const base = {
		key: 'stability' as const,
		label: 'loop',
		before: before.unstablePoles,
		after: after.unstablePoles,
		beforeText: text(before),
		afterText: text(after),
		delta: after.unstablePoles - before.unstablePoles,
		relative: null
	};
	if (before.stable && !after.stable)
		return {
			...base,
			changeText: `became unstable (${poles(after.unstablePoles)})`,
			tone: 'worse'
		};
	if (!before.stable && after.stable)
		return { ...base, changeText: 'became stable', tone: 'better' };
	if (!after.stable && before.unstablePoles !== after.unstablePoles) {
		return {
			...base,
			changeText: `is still unstable, with ${poles(after.unstablePoles)} instead of ${before.unstablePoles}`,
			tone: after.unstablePoles > before.unstablePoles ? 'worse' : 'better'
		};
	}
	return { ...base, changeText: null, tone: 'same' };
}

/** Every figure of two sets (worst cases, or one case in both revisions). */
function compareSet(
	a: MarginFigures,
	b: MarginFigures,
	aCases: MarginsResult['cases'],
	bCases: MarginsResult['cases'],
	sources?: { a: MarginsResult['worstCase']['from']; b: MarginsResult['worstCase']['from'] }
): FigureChange[] {
	const va = figureValues(a, aCases);
	const vb = figureValues(b, bCases);
	const stable = { before: a.stable, after: b.stable };
	const rows: FigureChange[] = [compareStability(a, b)];
	// One gain crossover on both sides: one row, not a "lowest" and a "highest" that say the same.
	const single =
		va.crossoverLowHz === va.crossoverHighHz && vb.crossoverLowHz === vb.crossoverHighHz;
	for (const info of FIGURES) {
		if (single && info.key === 'crossoverHighHz') continue;
		const row = compareFigure(
			single && info.key === 'crossoverLowHz' ? { ...info, label: 'gain crossover' } : info,
			va[info.key],
			vb[info.key],
			stable
		);
		// A figure neither revision has (delay in samples of a continuous loop): not a row.
		if (
			row.before === null &&
			row.after === null &&
			info.whenNull === 'none' &&
			a.stable &&
			b.stable
		)
			continue;
		if (sources && info.source) {
			row.fromBefore = sources.a[info.source];
			row.fromAfter = sources.b[info.source];
		}
		rows.push(row);
	}
	return rows;
}

function notComparable(side: RevisionSide): string | null {
	if (side.state === 'rejected') {
		const where = side.error?.path ? ` at ${side.error.path}` : '';
		return `Revision ${side.number} was rejected${side.error ? ` (${side.error.message}${where})` : ''}: it has no margins to compare.`;
	}
	if (side.state !== 'computed' || !side.result)
		return `Revision ${side.number} is not computed yet: its margins are still to come.`;
	return null;
}

/** Compare revision `before` (normally the older) with revision `after`. */
export function diffRevisions(before: RevisionSide, after: RevisionSide): RevisionDiff {
	const since = `since revision ${before.number}`;
	const notes = [notComparable(before), notComparable(after)].filter(
		(n): n is string => n !== null
	);
	const model = diffSummaries(before.summary, after.summary);
	const out: RevisionDiff = {
		before: before.number,
		after: after.number,
		sentences: [],
		notes,
		worstCase: [],
		cases: [],
		model
	};
	if (!notes.length && before.result && after.result) {
		const [a, b] = [before.result, after.result];
		out.worstCase = compareSet(a.worstCase, b.worstCase, a.cases, b.cases, {
			a: a.worstCase.from,
			b: b.worstCase.from
		});
		for (const row of out.worstCase) {
			if (!row.changeText) continue;
			// The stability row's change already names the poles; the others show both values.
			const text =
				row.key === 'stability'
					? `The loop ${row.changeText} ${since}.`
					: `${capital(row.label)} ${row.changeText} ${since} (${row.beforeText} → ${row.afterText}).`;
			out.sentences.push({ text, tone: row.tone });
		}
		const names = [...new Set([...a.cases.map((c) => c.name), ...b.cases.map((c) => c.name)])];
		for (const name of names) {
			const ca = a.cases.find((c) => c.name === name);
			const cb = b.cases.find((c) => c.name === name);
			if (ca && cb)
				out.cases.push({ name, presence: 'both', figures: compareSet(ca, cb, [ca], [cb]) });
			else out.cases.push({ name, presence: ca ? 'removed' : 'added', figures: [] });
		}
		const added = out.cases.filter((c) => c.presence === 'added').map((c) => `“${c.name}”`);
		const removed = out.cases.filter((c) => c.presence === 'removed').map((c) => `“${c.name}”`);
		if (added.length)
			out.sentences.push({
				text: `Operating case${added.length > 1 ? 's' : ''} ${added.join(', ')} added ${since}.`,
				tone: 'neutral'
			});
		if (removed.length)
			out.sentences.push({
				text: `Operating case${removed.length > 1 ? 's' : ''} ${removed.join(', ')} removed ${since}.`,
				tone: 'neutral'
			});
		if (!out.sentences.length)
			out.sentences.push({
				text: `No margin figure changed ${since} at the precision shown.`,
				tone: 'same'
			});
	}
	if (model.length && !model.some((m) => m.changed)) {
		out.sentences.push({
			text: `Model: same structure ${since} (blocks, order, cases, timing); the file differs in its coefficients or text.`,
			tone: 'neutral'
		});
	}
	for (const m of model) {
		// Case changes are told once, from the margins, when both revisions have them.
		if (!m.sentence || (m.field === 'cases' && out.cases.length)) continue;
		out.sentences.push({ text: `Model: ${m.sentence} ${since}.`, tone: 'neutral' });
	}
	return out;
}
