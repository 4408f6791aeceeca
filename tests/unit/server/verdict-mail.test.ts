import { afterEach, describe, expect, it } from 'vitest';
import { leadGetsImmediateMail } from '../../../src/lib/server/verdicts/digest';
import { verdictDigestMail } from '../../../src/lib/server/mail/templates/digest';
import { testFaults } from '../../../src/lib/server/config';

const at = (iso: string) => new Date(iso);

describe('which way a change reaches the class lead', () => {
	const since = at('2026-12-01T10:00:00Z');
	it('always immediately for a lead who never chose the digest', () => {
		expect(leadGetsImmediateMail({ mode: 'immediate', since: null }, { at: at('2026-01-01T00:00:00Z'), digestId: null })).toBe(true);
	});
	it('by digest for changes after the digest was chosen, immediately for those before', () => {
		expect(leadGetsImmediateMail({ mode: 'digest', since }, { at: at('2026-12-01T10:00:01Z'), digestId: null })).toBe(false);
		expect(leadGetsImmediateMail({ mode: 'digest', since }, { at: at('2026-12-01T09:59:59Z'), digestId: null })).toBe(true);
	});
	it('never twice: a change a digest listed gets no immediate mail, even after switching back', () => {
		expect(leadGetsImmediateMail({ mode: 'immediate', since }, { at: at('2026-12-01T09:00:00Z'), digestId: 'd1' })).toBe(false);
		// Committed too late for the last digest: nothing listed it, so the immediate mail does.
		expect(leadGetsImmediateMail({ mode: 'immediate', since }, { at: at('2026-12-01T09:00:00Z'), digestId: null })).toBe(true);
	});
});

describe('digest message', () => {
	it('names each loop, its revision, its failing criteria with required and actual, and links, in text and HTML', () => {
		const mail = verdictDigestMail({
			to: 'lead@x.test',
			name: 'Ada <Lead>',
			since: at('2026-12-01T06:00:00Z'),
			until: at('2026-12-02T06:00:00Z'),
			settingsUrl: 'http://h/settings/notifications',
			loops: [
				{
					loopKey: 'ax1-speed',
					loopName: 'Axis 1 speed',
					productName: 'Tarn S2',
					from: 'compliant',
					verdict: 'noncompliant',
					revisionNumber: 4,
					url: 'http://h/loops/1',
					criteria: [
						{ criterion: 'phaseMargin', status: 'fail', required: '45', comparison: 'at least', actual: 38.21, shortfall: '6.79' },
						{ criterion: 'upperGainMargin', status: 'pass', required: '6', comparison: 'at least', actual: 9, shortfall: null }
					] as never
				}
			]
		});
		expect(mail.subject).toBe('[Headroom] Daily digest: 1 loop got worse');
		expect(mail.text).toContain('ax1-speed "Axis 1 speed" of Tarn S2: compliant → noncompliant (revision 4)');
		expect(mail.text).toMatch(/Phase margin: required at least 45 °, actual 38\.21 °/);
		expect(mail.text).not.toMatch(/Upper gain margin/i);
		expect(mail.text).toContain('http://h/loops/1');
		expect(mail.html).toContain('<a href="http://h/loops/1"><strong>ax1-speed</strong></a>');
		expect(mail.html).toContain('Ada &lt;Lead&gt;');
	});
});

describe('test-only fault points', () => {
	const saved = { ...process.env };
	afterEach(() => {
		process.env = { ...saved };
	});
	it('are read from HEADROOM_TEST_FAULTS, and ignored in production', () => {
		process.env.HEADROOM_TEST_FAULTS = 'compute-hold-after-download';
		process.env.NODE_ENV = 'test';
		expect(testFaults()).toEqual(['compute-hold-after-download']);
		process.env.NODE_ENV = 'production';
		expect(testFaults()).toEqual([]);
	});
});
