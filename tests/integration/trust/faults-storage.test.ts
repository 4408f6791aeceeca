/**
 * Faults of the object store, on the real HTTP path: a built app and a worker process talking to
 * an S3 fake of this file's own, which the tests kill (as a crashed store) and start again over
 * the same files. The store is always running again when a test ends.
 *
 * Invariant checked after every fault: each revision row that holds an upload has its object in
 * the store, and each object under the loop's prefix has its row — or the reconcile pass removes
 * it (the test runs that pass and sees the repair).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { BUILD_TIMEOUT_MS, startBuiltApp, type BuiltApp } from '../support/built-app';
import { testEnv } from '../support/env';
import { headObject, listObjects } from '../../../src/lib/server/storage/s3';
import { reconcileStorage } from '../../../src/lib/server/revisions/reconcile';
import { apiUpload, boxedFetch, startPrivateS3, startWorker, trustAppEnv, until, type PrivateS3, type WorkerProcess } from './support';

let app: BuiltApp;
let store: PrivateS3;
let worker: WorkerProcess;
let loopId: string;
const dir = mkdtempSync(join(tmpdir(), 'headroom-trust-s3-'));
const savedEndpoint = process.env.S3_ENDPOINT;
const TOKEN = 'hr_demo_engineer';

const sql = <T>(q: string, p: unknown[] = []) => app.orm.em.getConnection().execute<T[]>(q, p);
const model = (gain: number, padding = 0) =>
	JSON.stringify({
		format: 'headroom-loop-model/1',
		title: `fault test ${'x'.repeat(padding)}`,
		blocks: [{ type: 'polynomial', numerator: [gain], denominator: [1, 3, 3, 1] }]
	});
const revisionRows = () =>
	sql<{ id: string; object_key: string; state: string; job_error: string | null }>(
		`select id, object_key, state, job_error from revision where loop_id = ? order by number`,
		[loopId]
	);

/** Store calls give up after 5 s here (30 s by default), so a hung store is seen quickly. */
const S3_TIMEOUT_MS = '5000';
async function workerEnv() {
	return { S3_ENDPOINT: store.endpoint, S3_TIMEOUT_MS };
}

beforeAll(async () => {
	store = await startPrivateS3(dir, testEnv.s3.bucket);
	// This file's own process (seed, reconcile, checks) talks to the private store as well.
	process.env.S3_ENDPOINT = store.endpoint;
	app = await startBuiltApp({ prefix: 'trust_s3', seed: true, env: { ...trustAppEnv, S3_ENDPOINT: store.endpoint, S3_TIMEOUT_MS } });
	worker = await startWorker(app.db.url, await workerEnv());
	[{ id: loopId }] = await sql<{ id: string }>(
		`select l.id from loop l join app_user u on u.id = l.owner_id where u.email = 'engineer@headroom.test' and l.archived_at is null order by l.key limit 1`
	);
}, BUILD_TIMEOUT_MS);

afterAll(async () => {
	await worker?.stop();
	await app?.stop();
	await store?.stop();
	if (savedEndpoint === undefined) delete process.env.S3_ENDPOINT;
	else process.env.S3_ENDPOINT = savedEndpoint;
	rmSync(dir, { recursive: true, force: true });
});

/** Rows ⟷ objects for the loop: which rows lack their object, which objects lack their row. */
async function consistency() {
	const rows = await revisionRows();
	const withUpload = rows.filter((r) => r.state !== 'awaiting-upload' && r.state !== 'rejected');
	const rowsWithoutObject: string[] = [];
	for (const r of withUpload) if (!(await headObject(r.object_key))) rowsWithoutObject.push(r.object_key);
	const keys = new Set(rows.map((r) => r.object_key));
	const objectsWithoutRow = (await listObjects(`models/${loopId}/`)).map((o) => o.key).filter((k) => !keys.has(k));
	return { rowsWithoutObject, objectsWithoutRow };
}

describe('the object store down', () => {
	it('answers an upload 503 in words and records nothing while the store is gone', async () => {
		const before = (await revisionRows()).length;
		await store.stop();
		try {
			const response = await apiUpload(app.url, loopId, TOKEN, model(1.1), 'while-down.json');
			expect(response.hung, 'the upload hung').toBe(false);
			expect(response.status, response.body).toBe(503);
			expect(response.json.error).toMatchObject({ code: 'unavailable', message: expect.stringMatching(/object store is unavailable.*not stored/i) });
			expect((await revisionRows()).length).toBe(before);
			// The health check names the store as the part that is down.
			const health = await boxedFetch(`${app.url}/api/health`);
			expect(health.hung).toBe(false);
			expect(health.status).toBe(503);
			expect(health.body).toMatch(/storage|s3|store/i);
		} finally {
			await store.start();
		}
		const after = await apiUpload(app.url, loopId, TOKEN, model(1.2), 'after-restart.json');
		expect(after.status, after.body).toBe(202);
		expect(await consistency()).toEqual({ rowsWithoutObject: [], objectsWithoutRow: [] });
	});

	it('hung (accepts connections, never answers): the upload still answers 503 in words, in bounded time', async () => {
		const before = (await revisionRows()).length;
		store.pause();
		try {
			const response = await apiUpload(app.url, loopId, TOKEN, model(1.15), 'while-hung.json');
			expect(response.hung, 'the upload hung').toBe(false);
			expect(response.status, response.body).toBe(503);
			expect(response.json.error?.message).toMatch(/object store is unavailable/i);
			const health = await boxedFetch(`${app.url}/api/health`);
			expect(health.hung).toBe(false);
			expect(health.status).toBe(503);
		} finally {
			store.resume();
		}
		expect((await revisionRows()).length).toBe(before);
		const after = await apiUpload(app.url, loopId, TOKEN, model(1.16), 'after-hang.json');
		expect(after.status, after.body).toBe(202);
		expect(await consistency()).toEqual({ rowsWithoutObject: [], objectsWithoutRow: [] });
	});

	it('killed in the middle of a burst of uploads: every request answered, rows and objects agree', async () => {
		const before = (await revisionRows()).length;
		// Big enough (~1 MB each) that the store is killed while some are still being written.
		const uploads = Array.from({ length: 16 }, (_, i) => apiUpload(app.url, loopId, TOKEN, model(1.3 + i / 100, 1_000_000), `burst-${i}.json`));
		// Kill the store as soon as the first of them has been stored and recorded: the others are
		// then somewhere between the request, the store and the database.
		await until('the first upload of the burst to be recorded', async () => ((await revisionRows()).length > before ? true : undefined), 60_000);
		await store.stop();
		const answers = await Promise.all(uploads);
		await store.start();
		const statuses = answers.map((a) => a.status);
		expect(answers.filter((a) => a.hung), 'hung uploads').toEqual([]);
		expect(statuses.every((s) => s === 202 || s === 503), statuses.join(',')).toBe(true);
		for (const a of answers.filter((x) => x.status === 503)) expect(a.json.error?.message).toMatch(/unavailable/i);
		const accepted = answers.filter((a) => a.status === 202).length;
		console.info(`[trust] burst: ${accepted} of ${answers.length} uploads accepted, ${answers.length - accepted} answered 503`);
		expect((await revisionRows()).length).toBe(before + accepted);

		let check = await consistency();
		expect(check.rowsWithoutObject, 'revision rows whose object is missing').toEqual([]);
		console.info(`[trust] burst: ${check.objectsWithoutRow.length} object(s) without a row before the reconcile pass`);
		if (check.objectsWithoutRow.length) {
			// Stored just before its row failed: the reconcile pass removes it once it is old.
			const report = await reconcileStorage(app.orm.em.fork(), new Date(Date.now() + 2 * 3600_000));
			expect(report.orphanObjectsDeleted).toBeGreaterThanOrEqual(check.objectsWithoutRow.length);
			check = await consistency();
		}
		expect(check).toEqual({ rowsWithoutObject: [], objectsWithoutRow: [] });
		// Everything accepted is computed once the store is back.
		await until('every accepted revision to compute', async () => {
			const rows = await revisionRows();
			return rows.every((r) => r.state === 'computed' || r.state === 'rejected') ? rows : undefined;
		}, 120_000, worker.log);
	}, 240_000);

	it('down while the worker reads a revision: the job is retried and computes once the store is back', async () => {
		await worker.stop();
		const upload = await apiUpload(app.url, loopId, TOKEN, model(1.5), 'worker-fault.json');
		expect(upload.status, upload.body).toBe(202);
		const id = upload.json.revision!.id;
		await store.stop();
		try {
			worker = await startWorker(app.db.url, await workerEnv());
			const seen = await until('the worker to report the unreachable store', async () => {
				const [row] = await sql<{ state: string; job_error: string | null }>('select state, job_error from revision where id = ?', [id]);
				return row.job_error ? row : undefined;
			}, 90_000, worker.log);
			expect(seen.job_error).toMatch(/Could not read the file from storage/);
			expect(seen.state).not.toBe('rejected');
		} finally {
			await store.start();
		}
		const done = await until('the retried job to compute', async () => {
			const [row] = await sql<{ state: string }>('select state from revision where id = ?', [id]);
			return row.state === 'computed' ? row : undefined;
		}, 120_000, worker.log);
		expect(done.state).toBe('computed');
		const [{ n }] = await sql<{ n: number }>('select count(*)::int as n from margin_report where revision_id = ?', [id]);
		expect(n).toBe(1);
	}, 240_000);
});

describe('the same storage event delivered five times at once (over HTTP)', () => {
	it('makes one queued revision and one report', async () => {
		const presigned = await boxedFetch(`${app.url}/api/loops/${loopId}/revisions/upload-url`, {
			method: 'POST',
			headers: { authorization: `Bearer ${TOKEN}`, 'content-type': 'application/json', accept: 'application/json' },
			body: JSON.stringify({ fileName: 'presigned.json' })
		});
		expect(presigned.status, presigned.body).toBeLessThan(300);
		const { revision, uploadUrl } = JSON.parse(presigned.body) as { revision: { id: string }; uploadUrl: string };
		expect((await fetch(uploadUrl, { method: 'PUT', body: model(1.7) })).ok).toBe(true);
		const [{ object_key: key }] = await sql<{ object_key: string }>('select object_key from revision where id = ?', [revision.id]);
		const event = JSON.stringify({ Records: [{ eventName: 'ObjectCreated:Put', s3: { object: { key } } }] });
		const answers = await Promise.all(
			Array.from({ length: 5 }, () =>
				boxedFetch(`${app.url}/api/storage-events`, {
					method: 'POST',
					headers: { 'content-type': 'application/json', 'x-headroom-storage-secret': testEnv.storageEventsSecret },
					body: event
				})
			)
		);
		expect(answers.map((a) => a.status)).toEqual([200, 200, 200, 200, 200]);
		const outcomes = answers.flatMap((a) => (JSON.parse(a.body) as { outcomes: string[] }).outcomes);
		expect(outcomes.filter((o) => o === 'queued')).toHaveLength(1);
		expect(outcomes.filter((o) => o === 'already')).toHaveLength(4);
		expect(await sql('select 1 from revision where object_key = ?', [key])).toHaveLength(1);
		await until('the announced revision to compute', async () => {
			const [row] = await sql<{ state: string }>('select state from revision where id = ?', [revision.id]);
			return row.state === 'computed' ? true : undefined;
		}, 90_000, worker.log);
		expect(await sql('select 1 from margin_report where revision_id = ?', [revision.id])).toHaveLength(1);
	});
});
