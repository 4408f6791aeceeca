/**
 * The table of every loop, targets against actuals: the worst case of each main margin over the
 * targets of the requirement version used, the other criteria in words; the header row is
 * repeated on every page.
 */
import { CRITERION_LABELS, type Criterion } from '../../compliance/criteria';
import type { CriterionResult } from '../../compliance/judge';
import type { ReportLoop } from '../../reports/types';
import { actualText, requiredText, STATUS_WORDS } from '../../reports/words';
import {
	BOTTOM,
	CONTENT_W,
	FAINT,
	heading,
	INK,
	LINE,
	MARGIN,
	SOFT,
	T,
	type Doc
} from './pdf-layout';
import { block, blockHeight } from './pdf-text';
import { VERDICT_INK, verdictLabel } from './pdf-verdict';

const MAIN: Criterion[] = ['phaseMargin', 'upperGainMargin', 'delayMarginSeconds', 'modulusMargin'];
const COLS = [
	{ title: 'Loop', w: 100 },
	{ title: 'Class · version', w: 60 },
	{ title: 'Rev', w: 20 },
	{ title: 'Verdict', w: 62 },
	{ title: 'Phase margin', w: 44 },
	{ title: 'Gain margin', w: 44 },
	{ title: 'Delay margin', w: 44 },
	{ title: 'Modulus', w: 44 }
];
const LAST_W = CONTENT_W - COLS.reduce((s, c) => s + c.w, 0);
const ALL_COLS = [...COLS, { title: 'Other criteria', w: LAST_W }];
const ROW_PAD = 3;

function tableHeader(doc: Doc) {
	const y = doc.y;
	// Two lines fit: "Phase / margin" wraps inside its column.
	doc.rect(MARGIN.left, y, CONTENT_W, 24).fill('#eef1f5');
	let x = MARGIN.left;
	for (const c of ALL_COLS) {
		doc
			.font('bold')
			.fontSize(7)
			.fillColor(SOFT)
			.text(c.title, x + 3, y + 3, { width: c.w - 6 });
		x += c.w;
	}
	doc.y = y + 24;
}

function cellCriterion(c: CriterionResult | undefined): {
	top: string;
	bottom: string;
	fail: boolean;
} {
	if (!c) return { top: '—', bottom: 'no target', fail: false };
	const mark = c.status === 'fail' ? ' fail' : c.status === 'covered' ? ' covered' : '';
	return { top: `${actualText(c)}${mark}`, bottom: requiredText(c), fail: c.status === 'fail' };
}

function tableRow(doc: Doc, l: ReportLoop, shade: boolean) {
	const texts: { top: string; bottom: string; fail?: boolean; mono?: boolean }[] = [
		{ top: `${l.product.key} / ${l.key}`, bottom: l.name },
		{ top: l.class.key, bottom: l.requirement ? `version ${l.requirement.version}` : 'not judged' },
		{ top: l.revision ? String(l.revision.number) : '—', bottom: '' },
		{ top: '', bottom: '' },
		...MAIN.map((k) => cellCriterion(l.criteria.find((c) => c.criterion === k))),
		{
			top: l.criteria
				.filter((c) => !MAIN.includes(c.criterion) && c.status !== 'not-applicable')
				.map(
					(c) =>
						`${CRITERION_LABELS[c.criterion]} ${actualText(c)} (${requiredText(c)}) ${STATUS_WORDS[c.status]}`
				)
				.join('; '),
			bottom: l.activeDeviations ? `${l.activeDeviations} active deviation(s)` : ''
		}
	];
	doc.fontSize(7);
	const heights = texts.map((t, i) => {
		const w = ALL_COLS[i].w - 6;
		doc.font(t.fail ? 'bold' : 'sans');
		const top = blockHeight(doc, T(t.top), w);
		doc.font('sans');
		return top + blockHeight(doc, T(t.bottom), w);
	});
	const h = Math.max(20, ...heights) + 2 * ROW_PAD;
	if (doc.y + h > BOTTOM) {
		doc.addPage();
		tableHeader(doc);
	}
	const y = doc.y;
	if (shade) doc.rect(MARGIN.left, y, CONTENT_W, h).fill('#f7f8fa');
	let x = MARGIN.left;
	texts.forEach((t, i) => {
		const w = ALL_COLS[i].w - 6;
		if (i === 3) {
			verdictLabel(doc, l.verdict, x + 3, y + ROW_PAD, 7);
		} else {
			doc
				.font(t.fail ? 'bold' : 'sans')
				.fontSize(7)
				.fillColor(t.fail ? VERDICT_INK.noncompliant : INK);
			block(doc, T(t.top), x + 3, y + ROW_PAD, w);
			if (t.bottom) {
				doc.font('sans').fontSize(7).fillColor(FAINT);
				block(doc, T(t.bottom), x + 3, doc.y, w);
			}
		}
		x += ALL_COLS[i].w;
	});
	doc
		.moveTo(MARGIN.left, y + h)
		.lineTo(MARGIN.left + CONTENT_W, y + h)
		.lineWidth(0.4)
		.stroke(LINE);
	doc.y = y + h;
	doc.x = MARGIN.left;
}

export function loopTable(doc: Doc, loops: ReportLoop[]) {
	doc.addPage();
	heading(doc, 'Every loop: targets against actuals');
	doc
		.font('sans')
		.fontSize(8)
		.fillColor(SOFT)
		.text(
			'Each margin cell shows the worst case over all operating cases (top) and the target of the requirement version named in the class column (below). "fail" marks a shortfall; "covered" one an active deviation covers.',
			{ width: CONTENT_W }
		);
	doc.moveDown(0.5);
	if (!loops.length) {
		doc.font('sans').fontSize(10).fillColor(INK).text('No loop matches this scope.');
		return;
	}
	tableHeader(doc);
	loops.forEach((l, i) => tableRow(doc, l, i % 2 === 1));
}
