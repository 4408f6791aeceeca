import type { Message } from '../transport';
import { CRITERION_LABELS, CRITERION_UNITS, type Criterion } from '../../../compliance/criteria';
import type { CriterionResult } from '../../../compliance/judge';

const escapeHtml = (s: string) =>
	s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

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

function line(c: CriterionResult): string {
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
		...(failing.length ? ['Failing criteria:', ...failing.map((c) => `- ${line(c)}`)] : []),
		'',
		`Open the loop: ${input.url}`,
		'',
		'Margins computed from a model are only as good as the model; local codes, standards and licensed engineering judgement decide.'
	];
	const html = [
		`<p>The verdict of loop <strong>${escapeHtml(input.loopKey)}</strong> “${escapeHtml(input.loopName)}” of ${escapeHtml(input.productName)} changed from ${escapeHtml(input.from)} to <strong>${escapeHtml(input.verdict)}</strong>${escapeHtml(rev)}.</p>`,
		failing.length ? `<ul>${failing.map((c) => `<li>${escapeHtml(line(c))}</li>`).join('')}</ul>` : '',
		`<p><a href="${escapeHtml(input.url)}">Open the loop in Headroom</a></p>`,
		'<p style="color:#666;font-size:12px">Margins computed from a model are only as good as the model; local codes, standards and licensed engineering judgement decide.</p>'
	].join('\n');
	return { to: input.to, subject: `[Headroom] ${title}`, text: lines.join('\n'), html };
}
