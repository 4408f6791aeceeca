/**
 * The trend chart's data: per figure, one point per revision with the target in force at that
 * revision and whether the point meets it (judged by the verdict rules themselves, so the chart
 * and the verdict never disagree). Pure: used by the page in the browser and by tests.
 */
import Decimal from 'decimal.js';
import { judge, type CriterionStatus } from '../compliance/judge';
import type { Criterion, Targets } from '../compliance/criteria';
import type { MarginsResult, WorstCase } from '../margins/types';
import { withUnit, type Unit } from './format';
import type { HistoryRequirement, HistoryRevision } from './types';

export type PanelKey =
	'phaseMargin' | 'upperGainMargin' | 'delayMargin' | 'delayMarginSamples' | 'modulusMargin';
export type PointStatus = 'pass' | 'fail' | 'no-target' | 'unstable' | 'rejected' | 'pending';

export interface TrendPoint {
	number: number;
	/** null: nothing to plot (unbounded, no crossover, unstable, rejected, pending); see `status` and `text`. */
	value: number | null;
	/** Drawn at the panel's edge when the value is null but the loop is stable (e.g. unbounded). */
	unbounded: boolean;
	status: PointStatus;
	text: string;
	target: number | null;
	targetText: string;
	requirementVersion: number | null;
}

export interface TrendPanel {
	key: PanelKey;
	title: string;
	unit: Unit;
	points: TrendPoint[];
}

/** The requirement version in force at a moment (the latest saved at or before it). */
export function inForceAt(
	requirements: HistoryRequirement[],
	at: string
): HistoryRequirement | null {
	const t = Date.parse(at);
	let found: HistoryRequirement | null = null;
	for (const r of requirements)
		if (Date.parse(r.inForceFrom) <= t && (!found || r.version > found.version)) found = r;
	return found;
}

interface PanelDef {
	key: PanelKey;
	title: string;
	unit: Unit;
	criteria: Criterion[];
	value: (w: WorstCase) => number | null;
	nullText: string;
	/** The target drawn: for the modulus margin the stricter of its minimum and 1 / max Ms. */
	target: (t: Targets) => { value: number; text: string } | null;
}

const num = (v: string | null | undefined) =>
	v === null || v === undefined || v === '' ? null : new Decimal(v).toNumber();

const simple = (field: keyof Targets, unit: Unit) => (t: Targets) => {
	const v = num(t[field]);
	return v === null ? null : { value: v, text: `at least ${withUnit(v, unit)}` };
};

export const PANELS: PanelDef[] = [
	{
		key: 'phaseMargin',
		title: 'Phase margin',
		unit: 'deg',
		criteria: ['phaseMargin'],
		value: (w) => w.phaseMarginDeg,
		nullText: 'no gain crossover',
		target: simple('minPhaseMarginDeg', 'deg')
	},
	{
		key: 'upperGainMargin',
		title: 'Upper gain margin',
		unit: 'dB',
		criteria: ['upperGainMargin'],
		value: (w) => w.upperGainMarginDb,
		nullText: 'unbounded',
		target: simple('minUpperGainMarginDb', 'dB')
	},
	{
		key: 'delayMargin',
		title: 'Delay margin',
		unit: 's',
		criteria: ['delayMarginSeconds'],
		value: (w) => w.delayMarginSeconds,
		nullText: 'no gain crossover',
		target: simple('minDelayMarginSeconds', 's')
	},
	{
		// sampled loops: shown when a requirement version asks for it (see trendPanels)
		key: 'delayMarginSamples',
		title: 'Delay margin (samples)',
		unit: 'samples',
		criteria: ['delayMarginSamples'],
		value: (w) => w.delayMarginSamples,
		nullText: 'no gain crossover',
		target: simple('minDelayMarginSamples', 'samples')
	},
	{
		key: 'modulusMargin',
		title: 'Modulus margin',
		unit: '',
		criteria: ['modulusMargin', 'peakSensitivity'],
		value: (w) => w.modulusMargin,
		nullText: '—',
		target: (t) => {
			const min = num(t.minModulusMargin);
			const ms = num(t.maxPeakSensitivity);
			const fromMs = ms === null ? null : 1 / ms;
			if (min === null && fromMs === null) return null;
			if (fromMs !== null && (min === null || fromMs > min))
				return {
					value: fromMs,
					text: `at least ${withUnit(fromMs, '')} (Ms at most ${t.maxPeakSensitivity})`
				};
			return { value: min!, text: `at least ${withUnit(min!, '')}` };
		}
	}
];

const worst = (statuses: CriterionStatus[]): PointStatus =>
	statuses.includes('fail') ? 'fail' : statuses.length ? 'pass' : 'no-target';

function point(
	def: PanelDef,
	r: HistoryRevision,
	requirement: HistoryRequirement | null
): TrendPoint {
	const target = requirement ? def.target(requirement.targets) : null;
	const base = {
		number: r.number,
		target: target?.value ?? null,
		targetText: target?.text ?? 'no target',
		requirementVersion: requirement?.version ?? null
	};
	if (r.state === 'rejected')
		return { ...base, value: null, unbounded: false, status: 'rejected', text: 'rejected' };
	if (!r.worstCase)
		return { ...base, value: null, unbounded: false, status: 'pending', text: 'not computed yet' };
	const w = r.worstCase;
	if (!w.stable)
		return { ...base, value: null, unbounded: false, status: 'unstable', text: 'unstable' };
	const value = def.value(w);
	// The verdict rules judge the point; only the worst case is read, so a stub result is enough.
	const result = {
		format: 'headroom-margins/1',
		engine: '',
		cases: [],
		worstCase: w
	} as MarginsResult;
	const judged = requirement
		? judge({ state: 'computed', result, targets: requirement.targets, now: new Date(0) }).criteria
		: [];
	const status = worst(
		judged.filter((c) => def.criteria.includes(c.criterion)).map((c) => c.status)
	);
	return {
		...base,
		value,
		unbounded: value === null,
		status,
		text: value === null ? def.nullText : withUnit(value, def.unit)
	};
}

/**
 * The panels of a loop: the delay margin in samples when any requirement version of its class
 * sets a minimum in samples, and in seconds unless only samples are ever asked for.
 */
function panelsFor(requirements: HistoryRequirement[]): PanelDef[] {
	const asks = (field: keyof Targets) => requirements.some((q) => num(q.targets[field]) !== null);
	const samples = asks('minDelayMarginSamples');
	const seconds = !samples || asks('minDelayMarginSeconds');
	return PANELS.filter(
		(def) => (def.key !== 'delayMarginSamples' || samples) && (def.key !== 'delayMargin' || seconds)
	);
}

export function trendPanels(
	revisions: HistoryRevision[],
	requirements: HistoryRequirement[]
): TrendPanel[] {
	return panelsFor(requirements).map((def) => ({
		key: def.key,
		title: def.title,
		unit: def.unit,
		points: revisions.map((r) =>
			point(def, r, requirements.find((q) => q.version === r.requirementVersion) ?? null)
		)
	}));
}
