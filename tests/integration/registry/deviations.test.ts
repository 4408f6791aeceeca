import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditRows, basicScenario, setupRegistry, type Registry } from './support';
import { domainError } from './errors';
import { getLoop } from '../../../src/lib/server/registry/loops';
import { grantDeviation, listDeviations, revokeDeviation, toJudgeInput } from '../../../src/lib/server/registry/deviations';
import { DeviationSchema } from '../../../src/lib/server/db/entities';
import { judge } from '../../../src/lib/compliance/judge';

let r: Registry;
let s: Awaited<ReturnType<typeof basicScenario>>;
beforeAll(async () => {
	r = await setupRegistry('reg_deviations');
	s = await basicScenario(r); // PM ≥ 45, GM ≥ 6 dB, crossover 20–300 Hz
});
afterAll(() => r?.close());

const days = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString();
const grant = {
	criteria: ['phaseMargin'],
	relaxed: { minPhaseMarginDeg: '40' },
	reason: 'Rig B resonance; notch filter arrives with firmware 2.4',
	expiresAt: days(90)
};

describe('deviations', () => {
	it('are granted by leads only', async () => {
		for (const who of ['viewer', 'engineer'] as const) {
			expect((await domainError(grantDeviation(r.em(), r.users[who], s.loop.id, grant))).code).toBe('forbidden');
		}
	});

	it('record the relaxed value, approver, start and expiry, and count on the loop', async () => {
		const d = await grantDeviation(r.em(), r.users.lead, s.loop.id, grant);
		expect(d).toMatchObject({ criteria: ['phaseMargin'], relaxed: { minPhaseMarginDeg: '40' }, status: 'active', approvedBy: { email: r.users.lead.email } });
		expect((await getLoop(r.em(), s.loop.id)).activeDeviations).toBe(1);
		const rows = await auditRows(r, 'deviation', d.id);
		expect(rows).toMatchObject([{ action: 'deviation.grant', actor_id: r.users.lead.id, after: { criteria: ['phaseMargin'], relaxed: { minPhaseMarginDeg: '40' } } }]);
	});

	it('cover a shortfall in the verdict rules while active; a listed criterion without value is waived', async () => {
		const waived = await grantDeviation(r.em(), r.users.lead, s.loop.id, { criteria: ['crossoverBand'], relaxed: {}, reason: 'bench rig', expiresAt: days(10) });
		expect(waived.relaxed).toEqual({ crossoverMinHz: null, crossoverMaxHz: null });
		const rows = await r.em().find(DeviationSchema, { loop: s.loop.id });
		const result = {
			format: 'headroom-margins/1' as const,
			engine: 't',
			cases: [{ name: 'nominal', gainCrossovers: [{ hz: 400, phaseMarginDeg: 42 }], phaseCrossovers: [] } as never],
			worstCase: {
				stable: true, unstablePoles: 0, upperGainMarginDb: 9, upperGainMarginHz: 900, lowerGainMarginDb: null,
				lowerGainMarginHz: null, phaseMarginDeg: 42, phaseMarginHz: 400, delayMarginSeconds: 0.001,
				delayMarginSamples: null, modulusMargin: 0.6, peakSensitivity: 1.6, peakSensitivityHz: 500, diskMargin: null, from: {}
			}
		};
		const targets = { minPhaseMarginDeg: '45', minUpperGainMarginDb: '6', crossoverMinHz: '20', crossoverMaxHz: '300' };
		const without = judge({ state: 'computed', result, targets, now: new Date() });
		expect(without.verdict).toBe('noncompliant');
		const withDeviations = judge({ state: 'computed', result, targets, deviations: rows.map(toJudgeInput), now: new Date() });
		expect(withDeviations.verdict).toBe('covered');
	});

	it('must relax, not tighten, and only criteria the class sets targets for', async () => {
		const tighter = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, relaxed: { minPhaseMarginDeg: '50' } }));
		expect([tighter.code, tighter.path]).toEqual(['invalid', 'relaxed.minPhaseMarginDeg']);
		const untargeted = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, criteria: ['modulusMargin'], relaxed: { minModulusMargin: '0.3' } }));
		expect(untargeted.path).toBe('criteria');
		const unlisted = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, relaxed: { minUpperGainMarginDb: '4' } }));
		expect(unlisted.path).toBe('relaxed.minUpperGainMarginDb');
		const unknown = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, criteria: ['bogus'] }));
		expect(unknown.path).toBe('criteria.0');
		const none = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, criteria: [] }));
		expect(none.path).toBe('criteria');
		const noReason = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, reason: '' }));
		expect(noReason.path).toBe('reason');
	});

	it('expire after they start: the service and the database both refuse otherwise', async () => {
		const backwards = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, startsAt: days(5), expiresAt: days(4) }));
		expect([backwards.code, backwards.path]).toEqual(['invalid', 'expiresAt']);
		const past = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, startsAt: days(-9), expiresAt: days(-1) }));
		expect(past.path).toBe('expiresAt');
		const badDate = await domainError(grantDeviation(r.em(), r.users.lead, s.loop.id, { ...grant, expiresAt: 'next week' }));
		expect(badDate.path).toBe('expiresAt');
		const conn = r.em().getConnection();
		const sql = `insert into deviation (loop_id, criteria, reason, approved_by_id, starts_at, expires_at) values (?, ?, 'raw', ?, ?, ?)`;
		await expect(conn.execute(sql, [s.loop.id, '{phaseMargin}', r.users.lead.id, days(2), days(1)])).rejects.toThrow(/deviation_expires_after_start/);
		const same = days(1);
		await expect(conn.execute(sql, [s.loop.id, '{phaseMargin}', r.users.lead.id, same, same])).rejects.toThrow(/deviation_expires_after_start/);
		await expect(conn.execute(sql, [s.loop.id, '{}', r.users.lead.id, days(1), days(2)])).rejects.toThrow(/deviation_criteria_not_empty/);
		await expect(conn.execute(sql, [s.loop.id, '{speed}', r.users.lead.id, days(1), days(2)])).rejects.toThrow(/deviation_criteria_known/);
	});

	it('are revoked by leads, once, and stay listed with who revoked them', async () => {
		const [latest] = await listDeviations(r.em(), s.loop.id);
		expect((await domainError(revokeDeviation(r.em(), r.users.engineer, latest.id))).code).toBe('forbidden');
		const revoked = await revokeDeviation(r.em(), r.users.admin, latest.id);
		expect(revoked).toMatchObject({ status: 'revoked', revokedBy: { email: r.users.admin.email } });
		expect((await domainError(revokeDeviation(r.em(), r.users.lead, latest.id))).code).toBe('conflict');
		expect((await domainError(revokeDeviation(r.em(), r.users.lead, 'nope'))).code).toBe('not_found');
		expect((await listDeviations(r.em(), s.loop.id)).map((d) => d.status)).toEqual(['revoked', 'active']);
		const rows = await auditRows(r, 'deviation', latest.id);
		expect(rows.map((a) => a.action)).toEqual(['deviation.grant', 'deviation.revoke']);
		expect(rows[1]).toMatchObject({ before: { revokedAt: null }, after: { revokedById: r.users.admin.id } });
	});

	it('report expired ones as expired and stop counting them', async () => {
		await r.em().getConnection().execute(
			`insert into deviation (loop_id, criteria, min_phase_margin_deg, reason, approved_by_id, starts_at, expires_at) values (?, '{phaseMargin}', 30, 'old', ?, ?, ?)`,
			[s.loop.id, r.users.lead.id, days(-60), days(-30)]
		);
		const statuses = (await listDeviations(r.em(), s.loop.id)).map((d) => d.status).sort();
		expect(statuses).toEqual(['active', 'expired', 'revoked']);
		expect((await getLoop(r.em(), s.loop.id)).activeDeviations).toBe(1);
	});
});
