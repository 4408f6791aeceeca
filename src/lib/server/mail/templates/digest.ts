import type { Message } from '../transport';
import type { CriterionResult } from '../../../compliance/judge';
import { criterionLine, escapeHtml, SAFETY_LINE } from './verdict';

export interface DigestLoop {
	loopKey: string;
	loopName: string;
	productName: string;
	/** The verdict before the first change of the period, and after the last. */
	from: string;
	verdict: string;
	revisionNumber: number | null;
	criteria: CriterionResult[];
	url: string;
}

export interface DigestMailInput {
	to: string;
	name: string;
	since: Date;
	until: Date;
	loops: DigestLoop[];
	settingsUrl: string;
}

const day = (d: Date) => d.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';

/** A lead's daily digest: every loop of their classes whose verdict got worse in the period. */
export function verdictDigestMail(input: DigestMailInput): Message {
	const n = input.loops.length;
	const period = `from ${day(input.since)} to ${day(input.until)}`;
	const heading = (l: DigestLoop) =>
		`${l.loopKey} "${l.loopName}" of ${l.productName}: ${l.from} → ${l.verdict}${l.revisionNumber === null ? '' : ` (revision ${l.revisionNumber})`}`;
	const failing = (l: DigestLoop) => l.criteria.filter((c) => c.status === 'fail');
	const text = [
		`Hello ${input.name},`,
		'',
		`${n === 1 ? 'One loop' : `${n} loops`} of your classes got a worse verdict ${period}:`,
		'',
		...input.loops.flatMap((l) => [heading(l), ...failing(l).map((c) => `  - ${criterionLine(c)}`), `  ${l.url}`, '']),
		`You receive one digest a day because you chose it; change that at ${input.settingsUrl}`,
		'',
		SAFETY_LINE
	].join('\n');
	const html = [
		`<p>Hello ${escapeHtml(input.name)},</p>`,
		`<p>${n === 1 ? 'One loop' : `${n} loops`} of your classes got a worse verdict ${escapeHtml(period)}:</p>`,
		'<ul>',
		...input.loops.map(
			(l) =>
				`<li><a href="${escapeHtml(l.url)}"><strong>${escapeHtml(l.loopKey)}</strong></a> ${escapeHtml(heading(l).slice(l.loopKey.length + 1))}` +
				(failing(l).length ? `<ul>${failing(l).map((c) => `<li>${escapeHtml(criterionLine(c))}</li>`).join('')}</ul>` : '') +
				'</li>'
		),
		'</ul>',
		`<p>You receive one digest a day because you chose it; <a href="${escapeHtml(input.settingsUrl)}">change that in your settings</a>.</p>`,
		`<p style="color:#666;font-size:12px">${escapeHtml(SAFETY_LINE)}</p>`
	].join('\n');
	return { to: input.to, subject: `[Headroom] Daily digest: ${n === 1 ? '1 loop' : `${n} loops`} got worse`, text, html };
}
