/**
 * The scheduled passes, run directly (no worker): reconcile puts right what slipped between the
 * store, the database and the queue; expiry judges loops again once their deviation lapses.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomUUID } from 'node:crypto';
import { setupRegistry, basicScenario, type Registry } from '../registry/support';
import { ensureBucket, headObject, putObject } from '../../../src/lib/server/storage/s3';
import { presignRevision, uploadRevision } from '../../../src/lib/server/revisions/upload';
import { reconcileStorage } from '../../../src/lib/server/revisions/reconcile';
import { modelKey } from '../../../src/lib/server/revisions/keys';
import { expireDeviations } from '../../../src/lib/server/verdicts/rejudge';
import { grantDeviation } from '../../../src/lib/server/registry/deviations';
import { QUEUES } from '../../../src/lib/server/jobs/queues';

let r: Registry;
let scenario: Awaited<ReturnType<typeof basicScenario>>;
const model = (gain: number) =>
	new TextEncoder().encode(JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'polynomial', numerator: [gain], denominator: [1, 6, 11, 6] }] }));

const jobsFor = async (revisionId: string) =>
	(
		await r.em().getConnection().execute<{ n: number }[]>(
			`select count(*)::int as n from pgboss.job where name = ? and singleton_key = ? and state in ('created', 'retry', 'active')`,
			[QUEUES.computeRevision, revisionId]
		)
	)[0].n;
const stateOf = async (id: string) =>
	(await r.em().getConnection().execute<{ state: string }[]>('select state from revision where id = ?', [id]))[0].state;

beforeAll(async () => {
	r = await setupRegistry('reconcile');
	await ensureBucket();
	scenario = await basicScenario(r);
});
afterAll(async () => r?.close());

describe('reconcile pass', () => {
	it('announces a presigned upload whose arrival nobody reported', async () => {
		const { revision, uploadUrl } = await presignRevision(r.em(), r.users.engineer, scenario.loop.id, {});
		expect((await fetch(uploadUrl, { method: 'PUT', body: model(3) })).ok).toBe(true);
		const report = await reconcileStorage(r.em());
		expect(report.announced).toBe(1);
		expect(await stateOf(revision.id)).toBe('queued');
		expect(await jobsFor(revision.id)).toBe(1);
	});

	it('enqueues again a queued revision whose job was lost', async () => {
		const rev = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, { bytes: model(5) });
		await r.em().getConnection().execute('delete from pgboss.job where singleton_key = ?', [rev.id]);
		expect(await jobsFor(rev.id)).toBe(0);
		const report = await reconcileStorage(r.em());
		expect(report.requeued).toBeGreaterThanOrEqual(1);
		expect(await jobsFor(rev.id)).toBe(1);
	});

	it('removes old objects that no revision row points at, and leaves young ones alone', async () => {
		const key = modelKey(scenario.loop.id, randomUUID());
		await putObject(key, 'orphan', 'application/octet-stream');
		await reconcileStorage(r.em());
		expect(await headObject(key)).not.toBeNull();
		const later = new Date(Date.now() + 2 * 60 * 60 * 1000);
		// The test bucket is shared by every test file's database, so others' objects count too.
		expect((await reconcileStorage(r.em(), later)).orphanObjectsDeleted).toBeGreaterThanOrEqual(1);
		expect(await headObject(key)).toBeNull();
	});

	it('marks a presigned upload that never arrived as rejected once its link expired', async () => {
		const { revision } = await presignRevision(r.em(), r.users.engineer, scenario.loop.id, {});
		const later = new Date(Date.now() + 2 * 60 * 60 * 1000);
		await reconcileStorage(r.em(), later);
		expect(await stateOf(revision.id)).toBe('rejected');
	});
});

describe('deviation expiry', () => {
	it('processes each lapsed deviation once', async () => {
		await grantDeviation(r.em(), r.users.lead, scenario.loop.id, {
			criteria: ['phaseMargin'],
			relaxed: { minPhaseMarginDeg: '30' },
			reason: 'temporary',
			expiresAt: new Date(Date.now() + 86_400_000).toISOString()
		});
		expect(await expireDeviations(r.em())).toBe(0);
		const afterExpiry = new Date(Date.now() + 2 * 86_400_000);
		expect(await expireDeviations(r.em(), afterExpiry)).toBe(1);
		expect(await expireDeviations(r.em(), afterExpiry)).toBe(0);
	});
});
