import type { Message } from '../transport';
import { CRITERION_LABELS, CRITERION_UNITS, type Criterion } from '../../../compliance/criteria';
import type { CriterionResult } from '../../../compliance/judge';

export const escapeHtml = (s: string) =>
	s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export const SAFETY_LINE =
	'Margins computed from a model are only as good as the model; local codes, standards and licensed engineering judgement decide.';

export interface VerdictMailInput {
	to: string;
	loopKey: string;
	loopName: string;
	productName: string;
	from: string;
	verdict: string;
	revisionNumber: number | null;
	criteria: CriterionResult[];
	url: string;
}

/** One criterion as a sentence: "Phase margin: required at least 45 °, actual 38.2 °". */
export function criterionLine(c: CriterionResult): string {
	const unit = CRITERION_UNITS[c.criterion as Criterion];
	const actual = c.actual === null ? '—' : `${Number(c.actual.toPrecision(4))}${unit ? ' ' + unit : ''}`;
	return `${CRITERION_LABELS[c.criterion as Criterion]}: required ${c.comparison} ${c.required}${unit ? ' ' + unit : ''}, actual ${actual}${c.note ? ` (${c.note})` : ''}`;
}

/** A loop's verdict got worse: what, where, and which criteria fail. Text first, simple HTML. */
export function verdictWorseMail(input: VerdictMailInput): Message {
	const failing = input.criteria.filter((c) => c.status === 'fail');
	const title = `${input.loopKey} is now ${input.verdict}`;
	const rev = input.revisionNumber === null ? '' : ` (revision ${input.revisionNumber})`;
	const lines = [
		`The verdict of loop ${input.loopKey} "${input.loopName}" of ${input.productName} changed from ${input.from} to ${input.verdict}${rev}.`,
		'',
		...(failing.length ? ['Failing criteria:', ...failing.map((c) => `- ${criterionLine(c)}`)] : []),
		'',
		`Open the loop: ${input.url}`,
		'',
		SAFETY_LINE
	];
	const html = [
		`<p>The verdict of loop <strong>${escapeHtml(input.loopKey)}</strong> “${escapeHtml(input.loopName)}” of ${escapeHtml(input.productName)} changed from ${escapeHtml(input.from)} to <strong>${escapeHtml(input.verdict)}</strong>${escapeHtml(rev)}.</p>`,
		failing.length ? `<ul>${failing.map((c) => `<li>${escapeHtml(criterionLine(c))}</li>`).join('')}</ul>` : '',
		`<p><a href="${escapeHtml(input.url)}">Open the loop in Headroom</a></p>`,
		`<p style="color:#666;font-size:12px">${escapeHtml(SAFETY_LINE)}</p>`
	].join('\n');
	return { to: input.to, subject: `[Headroom] ${title}`, text: lines.join('\n'), html };
}
