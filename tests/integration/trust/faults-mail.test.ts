/**
 * The SMTP server down when a verdict gets worse: the verdict change is committed regardless
 * (the verdict_event row is the outbox), the mail job fails and waits for its retry, and once the
 * server is back the retry delivers the message exactly once. The SMTP server is this file's own
 * (smtp-server, in process) so it can be stopped and started on the same port; the wait for
 * pg-boss's retry delay (30 s, growing) is shortened by moving the job's start time to now, as
 * the clock would. Extends tests/integration/revisions/pipeline.test.ts, which checks the mail
 * when the SMTP server is up.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SMTPServer } from 'smtp-server';
import { freePort } from '../../../scripts/lib/ports';
import { setupRegistry, basicScenario, type Registry } from '../registry/support';
import { ensureBucket } from '../../../src/lib/server/storage/s3';
import { uploadRevision } from '../../../src/lib/server/revisions/upload';
import { QUEUES } from '../../../src/lib/server/jobs/queues';
import { startWorker, until, type WorkerProcess } from './support';

interface Received {
	to: string[];
	data: string;
}

let r: Registry;
let worker: WorkerProcess;
let scenario: Awaited<ReturnType<typeof basicScenario>>;
let smtpPort: number;
let smtp: SMTPServer | undefined;
const received: Received[] = [];

function startSmtp(): Promise<void> {
	smtp = new SMTPServer({
		disabledCommands: ['STARTTLS', 'AUTH'],
		logger: false,
		onData(stream, session, callback) {
			let data = '';
			stream.on('data', (chunk) => (data += chunk));
			stream.on('end', () => {
				received.push({ to: session.envelope.rcptTo.map((a) => a.address), data });
				callback();
			});
		}
	});
	return new Promise((res, rej) => {
		smtp!.once('error', rej);
		smtp!.listen(smtpPort, '127.0.0.1', () => res());
	});
}

function stopSmtp(): Promise<void> {
	const server = smtp;
	smtp = undefined;
	return new Promise((res) => (server ? server.close(() => res()) : res()));
}

const w = 2 * Math.PI * 50;
const modelWithGain = (k: number) =>
	new TextEncoder().encode(JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'factored', zeros: [], poles: [-w, -2 * w, -3 * w], gain: k * w ** 3 }] }));
const sql = <T>(q: string, p: unknown[] = []) => r.em().getConnection().execute<T[]>(q, p);
const verdict = async () => (await sql<{ verdict: string }>('select verdict from loop where id = ?', [scenario.loop.id]))[0].verdict;
const settled = (id: string) =>
	until(`revision ${id} to settle`, async () => {
		const [row] = await sql<{ state: string }>('select state from revision where id = ?', [id]);
		return row.state === 'computed' || row.state === 'rejected' ? row.state : undefined;
	}, 60_000, () => worker.log());

beforeAll(async () => {
	r = await setupRegistry('trust_mail');
	await ensureBucket();
	scenario = await basicScenario(r, '-mail');
	smtpPort = await freePort();
	await startSmtp();
	worker = await startWorker(r.db.url, { SMTP_URL: `smtp://127.0.0.1:${smtpPort}` });
});

afterAll(async () => {
	await worker?.stop();
	await stopSmtp();
	await r?.close();
});

describe('the SMTP server down when a verdict gets worse', () => {
	it('keeps the verdict change, retries the mail later and delivers it once the server is back', async () => {
		const passing = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, { fileName: 'ok.json', bytes: modelWithGain(8) });
		expect(await settled(passing.id)).toBe('computed');
		expect(await verdict()).toBe('compliant');

		await stopSmtp();
		const failing = await uploadRevision(r.em(), r.users.engineer, scenario.loop.id, { fileName: 'worse.json', bytes: modelWithGain(24) });
		expect(await settled(failing.id)).toBe('computed');
		// The verdict change is committed with the revision, mail or no mail.
		expect(await verdict()).toBe('noncompliant');
		const [event] = await sql<{ id: string; verdict: string; notified_at: Date | null }>(
			`select id, verdict, notified_at from verdict_event where loop_id = ? and verdict = 'noncompliant'`,
			[scenario.loop.id]
		);
		expect(event.notified_at).toBeNull();
		const job = await until('the mail job to fail and wait for its retry', async () => {
			const [row] = await sql<{ id: string; state: string; output: unknown }>(
				`select id, state, output from pgboss.job where name = ? and data->>'eventId' = ? order by created_on desc limit 1`,
				[QUEUES.notifyVerdict, event.id]
			);
			return row?.state === 'retry' ? row : undefined;
		}, 60_000, () => worker.log());
		expect(JSON.stringify(job.output)).toMatch(/ECONNREFUSED|connect/i);
		expect(received).toHaveLength(0);
		// Still noncompliant and still waiting to be told: nothing was lost or rolled back.
		expect(await verdict()).toBe('noncompliant');
		expect((await sql<{ notified_at: Date | null }>('select notified_at from verdict_event where id = ?', [event.id]))[0].notified_at).toBeNull();

		await startSmtp();
		// Time passes: the retry comes due now rather than after pg-boss's delay.
		await sql(`update pgboss.job set start_after = now() where id = ? and state = 'retry'`, [job.id]);
		await until('the retried mail', async () => (received.length > 0 ? true : undefined), 60_000, () => worker.log());
		await until('the outbox row to be marked sent', async () => {
			const [row] = await sql<{ notified_at: Date | null }>('select notified_at from verdict_event where id = ?', [event.id]);
			return row.notified_at ? true : undefined;
		}, 30_000, () => worker.log());
		// One message per recipient (the owner, and the class's lead if it has one), none twice.
		const recipients = received.flatMap((m) => m.to);
		expect(recipients).toContain('engineer@registry.test');
		expect(new Set(recipients).size).toBe(recipients.length);
		for (const m of received) {
			expect(m.data).toMatch(/now noncompliant/);
			expect(m.data).toMatch(/from compliant to noncompliant/);
		}
	}, 240_000);
});
