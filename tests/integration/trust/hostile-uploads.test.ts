/**
 * Hostile and broken model files through the real upload path: multipart POST
 * /api/loops/:id/revisions on the built app, computed by a worker process. Each one is refused in
 * words that say what is wrong and where — by the upload itself before anything is stored (size),
 * or by the worker, leaving the revision `rejected` with the message and path — while the loop's
 * verdict stays as it was and the worker goes on to compute a valid file uploaded after them.
 * CPU and memory per file are figures of `npm run bench:hostile`, not assertions here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BUILD_TIMEOUT_MS, startBuiltApp, type BuiltApp } from '../support/built-app';
import { HOSTILE_INPUTS } from '../../../scripts/lib/hostile-inputs';
import { apiUpload, boxedFetch, startWorker, trustAppEnv, until, type WorkerProcess } from './support';

let app: BuiltApp;
let worker: WorkerProcess;
let loopId: string;
const TOKEN = 'hr_demo_engineer';
const sql = <T>(q: string, p: unknown[] = []) => app.orm.em.getConnection().execute<T[]>(q, p);

async function loopState() {
	const [loop] = await sql<{ verdict: string; updated: string }>(
		`select verdict, (select count(*) from revision where loop_id = l.id and state = 'computed')::text as updated from loop l where id = ?`,
		[loopId]
	);
	return loop;
}

const settled = (id: string) =>
	until(`revision ${id} to settle`, async () => {
		const [row] = await sql<{ state: string; error_message: string | null; error_path: string | null }>(
			'select state, error_message, error_path from revision where id = ?',
			[id]
		);
		return row.state === 'computed' || row.state === 'rejected' ? row : undefined;
	}, 90_000, () => worker.log());

beforeAll(async () => {
	app = await startBuiltApp({ prefix: 'trust_hostile', seed: true, env: trustAppEnv });
	worker = await startWorker(app.db.url);
	// A loop of the engineer's with a computed revision, so there is a verdict to leave alone.
	const [row] = await sql<{ id: string }>(
		`select l.id from loop l join app_user u on u.id = l.owner_id
		 where u.email = 'engineer@headroom.test' and l.archived_at is null order by l.key limit 1`
	);
	loopId = row.id;
	const first = await apiUpload(app.url, loopId, TOKEN, JSON.stringify({ format: 'headroom-loop-model/1', title: 'baseline', blocks: [{ type: 'polynomial', numerator: [2.2], denominator: [1, 3, 3, 1] }] }), 'baseline.json');
	if (first.status !== 202) throw new Error(`baseline upload: HTTP ${first.status} ${first.body}`);
	expect((await settled(first.json.revision!.id)).state).toBe('computed');
}, BUILD_TIMEOUT_MS);

afterAll(async () => {
	await worker?.stop();
	await app?.stop();
});

describe('hostile model files through POST /api/loops/:id/revisions', () => {
	it('refuses each in words naming what and where, leaves the verdict alone, and the worker carries on', async () => {
		const before = await loopState();
		const problems: string[] = [];
		const outcomes: string[] = [];
		for (const input of HOSTILE_INPUTS) {
			const bytes = input.bytes();
			const answer = await apiUpload(app.url, loopId, TOKEN, bytes, input.fileName);
			if (answer.hung) {
				problems.push(`${input.name}: the upload hung`);
				continue;
			}
			if (input.refusedBeforeStoring) {
				if (answer.status !== input.refusedBeforeStoring || !input.message.test(answer.json.error?.message ?? '')) {
					problems.push(`${input.name}: expected HTTP ${input.refusedBeforeStoring} with ${input.message}, got ${answer.status} ${answer.body.slice(0, 200)}`);
				}
				outcomes.push(`${input.name}: HTTP ${answer.status} ${answer.json.error?.message}`);
				continue;
			}
			if (answer.status !== 202) {
				problems.push(`${input.name}: expected 202 (stored, then judged by the worker), got ${answer.status} ${answer.body.slice(0, 200)}`);
				continue;
			}
			const done = await settled(answer.json.revision!.id);
			outcomes.push(`${input.name}: ${done.state} at "${done.error_path}": ${done.error_message}`);
			if (done.state !== 'rejected') problems.push(`${input.name}: ${done.state}, not rejected`);
			else if (done.error_path !== input.path && !(done.error_path ?? '').startsWith(input.path)) problems.push(`${input.name}: path "${done.error_path}", expected "${input.path}"`);
			else if (!input.message.test(done.error_message ?? '')) problems.push(`${input.name}: message "${done.error_message}" does not match ${input.message}`);
		}
		expect(problems, outcomes.join('\n')).toEqual([]);
		expect(await loopState()).toEqual(before);

		// The page of the loop shows the refusals with their messages.
		const revisions = await boxedFetch(`${app.url}/api/loops/${loopId}/revisions`, { headers: { authorization: `Bearer ${TOKEN}` } });
		expect(revisions.body).toContain('leading coefficient is zero');

		// The worker is still serving: a valid file uploaded after all of them computes.
		const good = await apiUpload(app.url, loopId, TOKEN, JSON.stringify({ format: 'headroom-loop-model/1', title: 'after the hostile files', blocks: [{ type: 'polynomial', numerator: [3.3], denominator: [1, 3, 3, 1] }] }), 'good.json');
		expect(good.status, good.body).toBe(202);
		expect((await settled(good.json.revision!.id)).state).toBe('computed');
		expect(worker.child.exitCode).toBeNull();
	}, 600_000);

	it('refuses a 50 MB upload sent without a Content-Length (chunked) as too large, storing nothing', async () => {
		const [{ n: before }] = await sql<{ n: number }>('select count(*)::int as n from revision where loop_id = ?', [loopId]);
		const boundary = '----headroom-trust';
		const head = new TextEncoder().encode(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.json"\r\nContent-Type: application/json\r\n\r\n`);
		const chunk = new Uint8Array(1024 * 1024).fill(0x20);
		let sent = 0;
		const body = new ReadableStream<Uint8Array>({
			pull(controller) {
				if (sent === 0) controller.enqueue(head);
				if (sent < 50) {
					controller.enqueue(chunk);
					sent++;
				} else {
					controller.enqueue(new TextEncoder().encode(`\r\n--${boundary}--\r\n`));
					controller.close();
				}
			}
		});
		const answer = await boxedFetch(`${app.url}/api/loops/${loopId}/revisions`, {
			method: 'POST',
			headers: { authorization: `Bearer ${TOKEN}`, 'content-type': `multipart/form-data; boundary=${boundary}`, accept: 'application/json' },
			body,
			// @ts-expect-error Node's fetch needs this for a streamed body; the DOM type lacks it.
			duplex: 'half'
		}, 60_000);
		expect(answer.hung).toBe(false);
		if (answer.status !== 0) {
			expect(answer.status, answer.body).toBe(413);
			expect(answer.body).toMatch(/limit/i);
		} else {
			// The server may cut the connection once the limit is passed: also a refusal.
			expect(answer.networkError).toBeDefined();
		}
		const [{ n: after }] = await sql<{ n: number }>('select count(*)::int as n from revision where loop_id = ?', [loopId]);
		expect(after).toBe(before);
	});
});
