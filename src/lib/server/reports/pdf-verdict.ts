/** A verdict on paper: a word and a shape in the verdict's ink, never a colour alone. */
import type { Verdict } from '../../compliance/judge';
import { VERDICT_LABELS } from '../../compliance/labels';
import { INK, type Doc } from './pdf-layout';
import { put } from './pdf-text';

/** Dark enough to read as grey on paper; the shape carries the meaning. */
export const VERDICT_INK: Record<Verdict, string> = {
	compliant: '#1d6b3a',
	noncompliant: '#a3261b',
	covered: '#7a5a00',
	unstable: '#7b1f6a',
	pending: '#4a5565',
	rejected: '#5b3a1a',
	empty: '#6b7280'
};

/** The verdict shape (the same shapes as VerdictBadge) in a box of `s` points at x, y. */
export function verdictShape(doc: Doc, verdict: Verdict, x: number, y: number, s = 8) {
	const k = s / 12;
	const ink = VERDICT_INK[verdict];
	doc.save().translate(x, y).scale(k);
	switch (verdict) {
		case 'compliant':
			doc.circle(6, 6, 5).fill(ink);
			doc
				.path('M3.5 6.2 5.2 7.8 8.6 4.3')
				.lineWidth(1.6)
				.lineCap('round')
				.lineJoin('round')
				.stroke('#ffffff');
			break;
		case 'noncompliant':
			doc.path('M1 2h10L6 11z').fill(ink);
			break;
		case 'covered':
			doc.path('M6 1 11 6 6 11 1 6z').lineWidth(1.4).stroke(ink);
			doc.path('M6 1 1 6 6 11z').fill(ink);
			break;
		case 'unstable':
			doc.path('M4 1h4l3 3v4l-3 3H4L1 8V4z').fill(ink);
			doc
				.path('M4.2 4.2 7.8 7.8M7.8 4.2 4.2 7.8')
				.lineWidth(1.4)
				.lineCap('round')
				.stroke('#ffffff');
			break;
		case 'pending':
			doc.circle(6, 6, 4.5).lineWidth(1.5).dash(2.2, { space: 1.6 }).stroke(ink);
			doc.undash();
			break;
		case 'rejected':
			doc.rect(1.5, 1.5, 9, 9).lineWidth(1.5).stroke(ink);
			doc.path('M2 10 10 2').lineWidth(1.5).stroke(ink);
			break;
		default:
			doc.path('M2 6h8').lineWidth(2).lineCap('round').stroke(ink);
	}
	doc.restore();
}

export function verdictLabel(doc: Doc, verdict: Verdict, x: number, y: number, size = 8) {
	verdictShape(doc, verdict, x, y + size * 0.12, size);
	doc.font('bold').fontSize(size).fillColor(VERDICT_INK[verdict]);
	put(doc, VERDICT_LABELS[verdict], x + size * 1.35, y);
	doc.fillColor(INK);
}
