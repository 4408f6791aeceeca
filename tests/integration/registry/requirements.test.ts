import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setupRegistry, auditRows, type Registry } from './support';
import { domainError } from './errors';
import { createClass, getClass } from '../../../src/lib/server/registry/classes';
import {
	compareVersions,
	getRequirement,
	requirementHistory,
	setRequirement
} from '../../../src/lib/server/registry/requirements';
import { judge } from '../../../src/lib/compliance/judge';

let r: Registry;
beforeAll(async () => {
	r = await setupRegistry('reg_requirements');
	await createClass(r.em(), r.users.lead, { key: 'current', name: 'Current loop' });
});
afterAll(() => r?.close());

const paging = { page: 1, pageSize: 50 };


describe('requirement versions', () => {
	it('start absent: a class without targets has no requirement in force', async () => {
		expect((await domainError(getRequirement(r.em(), 'current'))).code).toBe('not_found');
		expect((await getClass(r.em(), 'current')).requirement).toBeNull();
	});

	it('numbers each change 1, 2, 3 with author, time and reason; old versions stay readable', async () => {
		const v1 = await setRequirement(r.em(), r.users.lead, 'current', { minPhaseMarginDeg: '50', minUpperGainMarginDb: '8', reason: 'Initial targets' });
		const v2 = await setRequirement(r.em(), r.users.admin, 'current', { minPhaseMarginDeg: '55', minUpperGainMarginDb: '8', reason: 'Field oscillation at low speed' });
		expect([v1.version, v2.version]).toEqual([1, 2]);
		expect(v2.author.email).toBe(r.users.admin.email);
		expect(v2.reason).toBe('Field oscillation at low speed');
		expect(Date.parse(v2.createdAt)).toBeGreaterThanOrEqual(Date.parse(v1.createdAt));
		const current = await getRequirement(r.em(), 'current');
		expect(current.version).toBe(2);
		expect(current.targets.minPhaseMarginDeg).toBe('55');
		const history = await requirementHistory(r.em(), 'current', paging);
		expect(history.total).toBe(2);
		expect(history.items.map((v) => v.version)).toEqual([2, 1]);
		expect(history.items[1].targets.minPhaseMarginDeg).toBe('50');
	});

	it('records every version in the audit trail with its author', async () => {
		const history = await requirementHistory(r.em(), 'current', paging);
		for (const v of history.items) {
			const rows = await auditRows(r, 'requirement', v.id);
			expect(rows).toHaveLength(1);
			expect(rows[0].action).toBe('requirement.create');
			expect(rows[0].actor_id).toBe(v.author.id);
			expect((rows[0].after as { version: number }).version).toBe(v.version);
		}
	});

	it('refuses a change without a reason, naming the field', async () => {
		const e = await domainError(setRequirement(r.em(), r.users.lead, 'current', { minPhaseMarginDeg: '60', reason: '   ' }));
		expect([e.code, e.path]).toEqual(['invalid', 'reason']);
	});

	it('refuses saving targets identical to the version in force', async () => {
		const e = await domainError(setRequirement(r.em(), r.users.lead, 'current', { minPhaseMarginDeg: '55.000', minUpperGainMarginDb: '8', reason: 'again' }));
		expect(e.message).toMatch(/same as version 2/);
	});

	it('refuses a stale edit (someone saved a newer version meanwhile)', async () => {
		const e = await domainError(setRequirement(r.em(), r.users.lead, 'current', { minPhaseMarginDeg: '61', reason: 'x' }, 1));
		expect(e.code).toBe('conflict');
	});

	it('lets only leads and admins change targets', async () => {
		for (const who of ['viewer', 'engineer'] as const) {
			const e = await domainError(setRequirement(r.em(), r.users[who], 'current', { minPhaseMarginDeg: '60', reason: 'x' }));
			expect(e.code).toBe('forbidden');
		}
	});

	it('compares two versions field by field, with the direction of each change', async () => {
		const cmp = await compareVersions(r.em(), 'current', 1, 2);
		const pm = cmp.changes.find((c) => c.key === 'minPhaseMarginDeg')!;
		expect(pm).toMatchObject({ a: '50', b: '55', changed: true, direction: 'stricter' });
		expect(cmp.changes.find((c) => c.key === 'minUpperGainMarginDb')!.changed).toBe(false);
		expect((await domainError(compareVersions(r.em(), 'current', 1, 9))).code).toBe('not_found');
	});
});

describe('exact thresholds', () => {
	it('store and return decimal values exactly, including ones binary floats cannot hold', async () => {
		const v = await setRequirement(r.em(), r.users.lead, 'current', {
			minPhaseMarginDeg: '45.123456789',
			minDelayMarginSeconds: '0.000000001',
			minModulusMargin: '0.1',
			maxPeakSensitivity: '1.3',
			crossoverMinHz: '99999999999.999999999',
			reason: 'precision check'
		});
		const back = (await getRequirement(r.em(), 'current')).targets;
		expect(back).toMatchObject({
			minPhaseMarginDeg: '45.123456789',
			minDelayMarginSeconds: '0.000000001',
			minModulusMargin: '0.1',
			maxPeakSensitivity: '1.3',
			crossoverMinHz: '99999999999.999999999'
		});
		expect(v.targets.minUpperGainMarginDb).toBeNull();
	});

	it('accept JSON numbers through their shortest decimal form', async () => {
		const v = await setRequirement(r.em(), r.users.lead, 'current', { minPhaseMarginDeg: 47.1, minModulusMargin: 0.3, reason: 'numbers' });
		expect(v.targets).toMatchObject({ minPhaseMarginDeg: '47.1', minModulusMargin: '0.3' });
	});

	it('judge an actual value just below a target as failing and one equal to it as passing', async () => {
		const targets = (await getRequirement(r.em(), 'current')).targets; // PM ≥ 47.1
		const figures = (pm: number) => ({
			format: 'headroom-margins/1' as const,
			engine: 't',
			cases: [],
			worstCase: {
				stable: true, unstablePoles: 0, upperGainMarginDb: null, upperGainMarginHz: null,
				lowerGainMarginDb: null, lowerGainMarginHz: null, phaseMarginDeg: pm, phaseMarginHz: 10,
				delayMarginSeconds: null, delayMarginSamples: null, modulusMargin: 0.5, peakSensitivity: 2,
				peakSensitivityHz: 1, diskMargin: null, from: {}
			}
		});
		const pmOf = (pm: number) =>
			judge({ state: 'computed', result: figures(pm), targets, now: new Date() }).criteria.find((c) => c.criterion === 'phaseMargin')!;
		expect(pmOf(47.1).status).toBe('pass');
		expect(pmOf(47.09999999999).status).toBe('fail');
	});

	it('refuse more decimals than are stored, zero, negatives, Ms below 1 and an empty band', async () => {
		const cases: [Record<string, unknown>, string][] = [
			[{ minPhaseMarginDeg: '45.1234567891' }, 'minPhaseMarginDeg'],
			[{ minPhaseMarginDeg: '0' }, 'minPhaseMarginDeg'],
			[{ minUpperGainMarginDb: '-6' }, 'minUpperGainMarginDb'],
			[{ minUpperGainMarginDb: '6dB' }, 'minUpperGainMarginDb'],
			[{ maxPeakSensitivity: '0.9' }, 'maxPeakSensitivity'],
			[{ crossoverMinHz: '300', crossoverMaxHz: '20' }, 'crossoverMaxHz'],
			[{ crossoverMinHz: '300', crossoverMaxHz: '300' }, 'crossoverMaxHz']
		];
		for (const [targets, path] of cases) {
			const e = await domainError(setRequirement(r.em(), r.users.lead, 'current', { ...targets, reason: 'bad' }));
			expect([e.code, e.path]).toEqual(['invalid', path]);
		}
	});

	it('are range-checked by the database itself, whatever writes them', async () => {
		const conn = r.em().getConnection();
		const [{ class_id, author }] = await conn.execute<{ class_id: string; author: string }[]>(
			`select loop_class_id as class_id, author_id as author from requirement limit 1`
		);
		const insert = (cols: string) =>
			conn.execute(`insert into requirement (loop_class_id, version, author_id, reason, ${cols.split('=')[0]}) values (?, 900, ?, 'raw', ${cols.split('=')[1]})`, [class_id, author]);
		await expect(insert('min_phase_margin_deg=-1')).rejects.toThrow(/min_phase_margin_deg_positive/);
		await expect(insert('max_peak_sensitivity=0.5')).rejects.toThrow(/max_peak_sensitivity_at_least_one/);
		await expect(insert('min_modulus_margin=0')).rejects.toThrow(/min_modulus_margin_positive/);
		await expect(
			conn.execute(`insert into requirement (loop_class_id, version, author_id, reason, crossover_min_hz, crossover_max_hz) values (?, 901, ?, 'raw', 10, 5)`, [class_id, author])
		).rejects.toThrow(/crossover_band_order/);
		await expect(
			conn.execute(`insert into requirement (loop_class_id, version, author_id, reason) values (?, 902, ?, '  ')`, [class_id, author])
		).rejects.toThrow(/reason_not_blank/);
		await expect(
			conn.execute(`insert into requirement (loop_class_id, version, author_id, reason) values (?, 1, ?, 'dup')`, [class_id, author])
		).rejects.toThrow(/requirement_class_version_unique/);
	});
});
