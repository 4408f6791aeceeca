/**
 * The four margins the dashboard shows per loop (phase, upper gain, delay, modulus): the worst
 * case next to the target of the loop's class and how far short it falls. Pure, shared by the
 * table (browser) and the CSV export (server) so both say the same thing.
 */
import type { Criterion } from '../compliance/criteria';
import type { CriterionResult, CriterionStatus } from '../compliance/judge';

export interface WorstCaseColumns {
	phaseMarginDeg: number | null;
	upperGainMarginDb: number | null;
	delayMarginS: number | null;
	modulusMargin: number | null;
}

export interface MarginColumn {
	/** The column id and the `sort` value of /api/loops. */
	id: 'phaseMargin' | 'upperGainMargin' | 'delayMargin' | 'modulusMargin';
	criterion: Criterion;
	label: string;
	/** Column name stem and unit in the CSV export. */
	csv: string;
	actual: (w: WorstCaseColumns) => number | null;
	format: (v: number) => string;
}

const sig = (v: number, digits = 3) => Number(v.toPrecision(digits)).toString();

export const MARGIN_COLUMNS: MarginColumn[] = [
	{
		id: 'phaseMargin',
		criterion: 'phaseMargin',
		label: 'Phase margin',
		csv: 'phase_margin_deg',
		// Judged by its size: a negative phase margin on a stable loop is as far from −1.
		actual: (w) => (w.phaseMarginDeg === null ? null : Math.abs(w.phaseMarginDeg)),
		format: (v) => `${sig(v)}°`
	},
	{
		id: 'upperGainMargin',
		criterion: 'upperGainMargin',
		label: 'Upper gain margin',
		csv: 'upper_gain_margin_db',
		actual: (w) => w.upperGainMarginDb,
		format: (v) => `${sig(v)} dB`
	},
	{
		id: 'delayMargin',
		criterion: 'delayMarginSeconds',
		label: 'Delay margin',
		csv: 'delay_margin_s',
		actual: (w) => w.delayMarginS,
		format: (v) => (Math.abs(v) < 1e-3 ? `${sig(v * 1e6)} µs` : Math.abs(v) < 1 ? `${sig(v * 1000)} ms` : `${sig(v)} s`)
	},
	{
		id: 'modulusMargin',
		criterion: 'modulusMargin',
		label: 'Modulus margin',
		csv: 'modulus_margin',
		actual: (w) => w.modulusMargin,
		format: (v) => sig(v)
	}
];

export interface MarginCell {
	actual: number | null;
	/** The threshold as stored ("45"); null when the class sets no target for it. */
	required: string | null;
	/** pass / fail / covered / not-applicable from the judgement, or no-target. */
	status: CriterionStatus | 'no-target';
	/** How far short, in the criterion's unit (exact decimal text); null when not short. */
	shortfall: string | null;
	note?: string;
	relaxedTo?: string;
}

export function marginCell(item: { worstCase: WorstCaseColumns; criteria: CriterionResult[] }, column: MarginColumn): MarginCell {
	const judged = item.criteria.find((c) => c.criterion === column.criterion);
	const actual = column.actual(item.worstCase);
	if (!judged) return { actual, required: null, status: 'no-target', shortfall: null };
	return {
		actual: judged.actual ?? actual,
		required: judged.required,
		status: judged.status,
		shortfall: judged.shortfall,
		note: judged.note,
		relaxedTo: judged.relaxedTo
	};
}

/** A shortfall in the column's own unit, for people: "2.5° short". */
export function shortfallText(column: MarginColumn, cell: MarginCell): string | null {
	if (cell.status !== 'fail' && cell.status !== 'covered') return null;
	if (cell.shortfall === null) return cell.note ?? 'short';
	return `${column.format(Number(cell.shortfall))} short`;
}
