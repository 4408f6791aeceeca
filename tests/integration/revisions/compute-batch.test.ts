/**
 * The batched compute path called directly (no worker): a batch is judged as a whole, identical
 * files inside one batch are recognised, and a revision whose file cannot be read fails alone
 * while the rest of its batch is stored.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setupRegistry, basicScenario, type Registry } from '../registry/support';
import { deleteObject, ensureBucket } from '../../../src/lib/server/storage/s3';
import { announceObject, presignRevision, uploadRevision } from '../../../src/lib/server/revisions/upload';
import { computeRevisions } from '../../../src/lib/server/revisions/compute';

let r: Registry;
let scenario: Awaited<ReturnType<typeof basicScenario>>;
const model = (gain: number) =>
	JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'polynomial', numerator: [gain], denominator: [1, 6, 11, 6] }] });

const rows = (ids: string[]) =>
	r.em().getConnection().execute<{ id: string; state: string; error_message: string | null; reports: number }[]>(
		`select r.id, r.state, r.error_message, (select count(*)::int from margin_report m where m.revision_id = r.id) as reports
		 from revision r where r.id in (${ids.map(() => '?').join(', ')}) order by r.number`,
		ids
	);

async function presigned(body: string) {
	const { revision, uploadUrl } = await presignRevision(r.em(), r.users.engineer, scenario.loop.id, {});
	expect((await fetch(uploadUrl, { method: 'PUT', body })).ok).toBe(true);
	expect(await announceObject(r.em(), revision.objectKey)).toBe('queued');
	return revision;
}

beforeAll(async () => {
	r = await setupRegistry('compute-batch');
	await ensureBucket();
	scenario = await basicScenario(r);
});
afterAll(async () => r?.close());

describe('batched compute', () => {
	it('recognises identical files within one batch and names the earlier revision', async () => {
		const a = await presigned(model(2));
		const b = await presigned(model(2));
		const outcomes = await computeRevisions(r.em(), [b.id, a.id]);
		expect(outcomes.get(a.id)).toBe('computed');
		expect(outcomes.get(b.id)).toBe('rejected');
		const [first, second] = await rows([a.id, b.id]);
		expect(first).toMatchObject({ state: 'computed', reports: 1 });
		expect(second).toMatchObject({ state: 'rejected', reports: 0, error_message: `identical to revision ${a.number} of this loop` });
	});

	it('fails only the revision whose file is gone, stores the others, and skips what is done', async () => {
		const ok = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, { bytes: new TextEncoder().encode(model(3)) });
		const gone = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, { bytes: new TextEncoder().encode(model(4)) });
		await deleteObject(gone.objectKey);
		const outcomes = await computeRevisions(r.em(), [ok.id, gone.id]);
		expect(outcomes.get(ok.id)).toBe('computed');
		expect(outcomes.get(gone.id)).toBeInstanceOf(Error);
		const [stored, missing] = await rows([ok.id, gone.id]);
		expect(stored).toMatchObject({ state: 'computed', reports: 1 });
		// Left to pg-boss's retry: still computing, nothing stored.
		expect(missing).toMatchObject({ state: 'computing', reports: 0 });
		const judged = await r.em().getConnection().execute<{ judged_revision_id: string }[]>('select judged_revision_id from loop where id = ?', [scenario.loop.id]);
		expect(judged[0].judged_revision_id).toBe(ok.id);
		// Running the same batch again (a retried job) changes nothing that is done.
		expect((await computeRevisions(r.em(), [ok.id])).get(ok.id)).toBe('skipped');
		expect((await rows([ok.id]))[0].reports).toBe(1);
	});
});
