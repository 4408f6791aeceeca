/**
 * The cover page: scope in words, time, engine version, requirement versions, counts per
 * verdict, the caution note.
 */
import type { Verdict } from '../../compliance/judge';
import { VERDICTS } from '../../compliance/judge';
import { scopeInWords } from '../../reports/filters';
import type { ReportData, ReportLoop } from '../../reports/types';
import { targetsInWords } from '../../reports/words';
import {
	BRAND,
	CONTENT_W,
	heading,
	INK,
	keyValue,
	LINE,
	MARGIN,
	SOFT,
	T,
	when,
	type Doc
} from './pdf-layout';
import { flow, put } from './pdf-text';
import { verdictLabel } from './pdf-verdict';

export const CAUTION =
	'Margins computed from a model are only as good as the model. Local codes, standards and licensed engineering judgement decide whether a loop is fit for service.';

export function verdictCounts(loops: Pick<ReportLoop, 'verdict'>[]): Record<Verdict, number> {
	const counts = Object.fromEntries(VERDICTS.map((v) => [v, 0])) as Record<Verdict, number>;
	for (const l of loops) counts[l.verdict]++;
	return counts;
}

export function cover(doc: Doc, r: ReportData) {
	doc
		.font('bold')
		.fontSize(10)
		.fillColor(BRAND)
		.text('HEADROOM', MARGIN.left, MARGIN.top, { characterSpacing: 1.5 });
	doc.moveDown(0.6);
	doc.font('bold').fontSize(24).fillColor(INK).text('Compliance report');
	doc.moveDown(0.2);
	doc.font('sans').fontSize(13).fillColor(SOFT);
	flow(doc, T(scopeInWords(r.filters)), doc.x, doc.y, CONTENT_W);
	doc.moveDown(1);
	keyValue(doc, [
		['Generated', when(r.generatedAt)],
		['Requested by', `${r.requestedBy.name} <${r.requestedBy.email}>`],
		['Margin engine', r.engineVersion, 'mono'],
		['Report', r.id, 'mono'],
		['Loops', String(r.loops.length)]
	]);
	doc.moveDown(0.8);
	heading(doc, 'Verdicts', 12);
	const counts = verdictCounts(r.loops);
	const colW = CONTENT_W / 4;
	const top = doc.y;
	VERDICTS.forEach((v, i) => {
		const x = MARGIN.left + (i % 4) * colW;
		const y = top + Math.floor(i / 4) * 22;
		verdictLabel(doc, v, x, y, 9);
		doc.font('bold').fontSize(9).fillColor(INK);
		put(doc, String(counts[v]), x + colW - 40, y, { width: 30, align: 'right' });
	});
	doc.y = top + 2 * 22 + 6;
	doc.x = MARGIN.left;
	heading(doc, 'Requirement versions in force', 12);
	if (!r.requirements.length)
		doc.font('sans').fontSize(9).fillColor(SOFT).text('No loop class in scope has targets yet.');
	for (const q of r.requirements) {
		const y = doc.y;
		doc.font('bold').fontSize(9).fillColor(INK);
		flow(
			doc,
			T(`${q.className} (${q.classKey}) · version ${q.version}`),
			MARGIN.left,
			y,
			CONTENT_W
		);
		doc.font('sans').fontSize(8.5).fillColor(SOFT);
		flow(doc, T(targetsInWords(q.targets)), doc.x, doc.y, CONTENT_W);
		doc.moveDown(0.35);
	}
	const stale = r.loops.filter(
		(l) => l.requirement && !r.requirements.some((q) => q.requirementId === l.requirement!.id)
	);
	if (stale.length) {
		doc
			.font('sans')
			.fontSize(8.5)
			.fillColor(SOFT)
			.text(
				`${stale.length} loop(s) were last judged against an older version; their rows name the version used.`,
				{ width: CONTENT_W }
			);
	}
	doc.moveDown(1);
	const y = doc.y;
	doc.rect(MARGIN.left, y, CONTENT_W, 46).lineWidth(0.8).stroke(LINE);
	doc
		.font('bold')
		.fontSize(9)
		.fillColor(INK)
		.text('Caution', MARGIN.left + 10, y + 8);
	doc
		.font('sans')
		.fontSize(8.5)
		.fillColor(SOFT)
		.text(CAUTION, MARGIN.left + 10, y + 20, { width: CONTENT_W - 20 });
}
