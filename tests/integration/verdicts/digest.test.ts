/**
 * Daily digests on real PostgreSQL and the SMTP fake, the jobs' functions called directly: a lead
 * who chose the digest gets no immediate mail but one message listing the loops of their classes
 * that got worse; the owner keeps immediate mail; a day without news sends nothing; an SMTP
 * outage delays the digest and loses nothing; leaving the digest sends what it had not listed.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomUUID } from 'node:crypto';
import { setupRegistry, type Registry } from '../registry/support';
import { listMessages, waitForMessage } from '../support/mail';
import { ensureBucket } from '../../../src/lib/server/storage/s3';
import { UserSchema } from '../../../src/lib/server/db/entities';
import { createProduct } from '../../../src/lib/server/registry/products';
import { createClass } from '../../../src/lib/server/registry/classes';
import { createLoop } from '../../../src/lib/server/registry/loops';
import type { Actor } from '../../../src/lib/server/registry/common';
import { uploadRevision } from '../../../src/lib/server/revisions/upload';
import { computeRevision } from '../../../src/lib/server/revisions/compute';
import { notifyVerdict } from '../../../src/lib/server/verdicts/notify';
import { openDigests, sendDigest, setVerdictMail } from '../../../src/lib/server/verdicts/digest';
import { QUEUES } from '../../../src/lib/server/jobs/queues';

let r: Registry;
let lead: Actor;
let owner: Actor;
const tag = randomUUID().slice(0, 8);
const origin = 'http://127.0.0.1:1';
const loops: { id: string; key: string }[] = [];

// PM 35.4° against the class's 45° target: noncompliant.
const w = 2 * Math.PI * 50;
const failing = (i: number) =>
	new TextEncoder().encode(
		JSON.stringify({
			format: 'headroom-loop-model/1',
			blocks: [{ type: 'factored', zeros: [], poles: [-w, -2 * w, -3 * w], gain: (24 + i * 1e-6) * w ** 3 }]
		})
	);

const sql = <T extends object>(text: string, params: unknown[] = []) => r.em().getConnection().execute<T[]>(text, params);
const digestMails = async () => (await listMessages()).filter((m) => m.to?.some((a) => a.address === lead.email) && /Daily digest/.test(m.subject));
const mailsTo = async (email: string) => (await listMessages()).filter((m) => m.to?.some((a) => a.address === email));

/** Upload a failing model to loop i and compute it; answers the worse verdict change it made. */
async function worsen(i: number): Promise<string> {
	const rev = await uploadRevision(r.em(), owner, loops[i].id, { bytes: failing(i) });
	expect(await computeRevision(r.em(), rev.id)).toBe('computed');
	const [event] = await sql<{ id: string }>('select id from verdict_event where loop_id = ? and worse order by at desc limit 1', [loops[i].id]);
	return event.id;
}

async function person(key: string, role: 'lead' | 'engineer'): Promise<Actor> {
	const em = r.em();
	const u = em.create(UserSchema, { email: `${key}-${tag}@digest.test`, name: `Digest ${key}`, role, active: true, createdAt: new Date() });
	await em.flush();
	return { id: u.id, email: u.email, name: u.name, role };
}

beforeAll(async () => {
	r = await setupRegistry('digest');
	await ensureBucket();
	lead = await person('lead', 'lead');
	owner = await person('owner', 'engineer');
	await createProduct(r.em(), lead, { key: 'dg', name: 'Digest drive' });
	await createClass(r.em(), lead, {
		key: 'dg-speed',
		name: 'Digest speed loop',
		lead: lead.email,
		targets: { minPhaseMarginDeg: '45', minUpperGainMarginDb: '6', crossoverMinHz: '20', crossoverMaxHz: '300' }
	});
	for (let i = 0; i < 3; i++) {
		const loop = await createLoop(r.em(), lead, { product: 'dg', class: 'dg-speed', key: `dg-ax${i}-speed`, name: `Axis ${i} speed`, owner: owner.email });
		loops.push({ id: loop.id, key: loop.key });
	}
});
afterAll(async () => r?.close());

describe('verdict digests', () => {
	it('is a lead’s choice only', async () => {
		await expect(setVerdictMail(r.em(), owner, 'digest')).rejects.toThrow(/lead/);
		expect((await setVerdictMail(r.em(), lead, 'digest')).mode).toBe('digest');
	});

	it('keeps immediate mail for the owner and none for the digest lead', async () => {
		const eventId = await worsen(0);
		expect(await notifyVerdict(r.em(), eventId, origin)).toBe('sent');
		await waitForMessage({ to: owner.email, subject: /dg-ax0-speed is now noncompliant/ });
		expect(await mailsTo(lead.email)).toEqual([]);
	});

	it('opens one digest with its send job; an SMTP outage leaves it to the retry', async () => {
		expect(await openDigests(r.em())).toBe(1);
		const [digest] = await sql<{ id: string; loop_count: number; sent_at: string | null }>('select id, loop_count, sent_at from verdict_digest where user_id = ?', [lead.id]);
		expect(digest.loop_count).toBe(1);
		const jobs = await sql<{ n: number }>('select count(*)::int as n from pgboss.job where name = ? and singleton_key = ?', [QUEUES.sendDigest, digest.id]);
		expect(jobs[0].n).toBe(1);

		const smtp = process.env.SMTP_URL;
		process.env.SMTP_URL = 'smtp://127.0.0.1:9'; // nothing listens on the discard port
		try {
			await expect(sendDigest(r.em(), digest.id, origin)).rejects.toThrow();
		} finally {
			process.env.SMTP_URL = smtp;
		}
		expect((await sql<{ sent_at: string | null }>('select sent_at from verdict_digest where id = ?', [digest.id]))[0].sent_at).toBeNull();

		expect(await sendDigest(r.em(), digest.id, origin)).toBe('sent');
		const mail = await waitForMessage({ to: lead.email, subject: /Daily digest: 1 loop got worse/ });
		expect(mail.text).toContain(`dg-ax0-speed "Axis 0 speed" of Digest drive: empty → noncompliant (revision 1)`);
		expect(mail.text).toMatch(/Phase margin: required at least 45 °, actual 35\.4/);
		expect(mail.text).toContain(`${origin}/loops/${loops[0].id}`);
		expect(mail.html).toContain(`<a href="${origin}/loops/${loops[0].id}">`);
		// The outbox row is marked: the job running again sends nothing.
		expect(await sendDigest(r.em(), digest.id, origin)).toBe('skipped');
		expect(await digestMails()).toHaveLength(1);
	});

	it('sends nothing on a day without worse verdicts', async () => {
		expect(await openDigests(r.em(), new Date(Date.now() + 86_400_000))).toBe(0);
		expect((await sql<{ n: number }>('select count(*)::int as n from verdict_digest where user_id = ?', [lead.id]))[0].n).toBe(1);
	});

	it('lists only what got worse since the last digest', async () => {
		await worsen(1);
		expect(await openDigests(r.em())).toBe(1);
		const [digest] = await sql<{ id: string }>('select id from verdict_digest where user_id = ? and sent_at is null', [lead.id]);
		expect(await sendDigest(r.em(), digest.id, origin)).toBe('sent');
		const mail = await waitForMessage({ to: lead.email, subject: /Daily digest/, where: (m) => (m.text ?? '').includes('dg-ax1-speed') });
		expect(mail.text).not.toContain('dg-ax0-speed');
	});

	it('sends a last digest when the lead goes back to immediate mail, and no duplicate', async () => {
		const eventId = await worsen(2);
		await setVerdictMail(r.em(), lead, 'immediate');
		const [digest] = await sql<{ id: string; loop_count: number }>('select id, loop_count from verdict_digest where user_id = ? and sent_at is null', [lead.id]);
		expect(digest.loop_count).toBe(1);
		expect(await sendDigest(r.em(), digest.id, origin)).toBe('sent');
		await waitForMessage({ to: lead.email, subject: /Daily digest/, where: (m) => (m.text ?? '').includes('dg-ax2-speed') });
		// The change was listed in that digest: its immediate mail goes to the owner only.
		expect(await notifyVerdict(r.em(), eventId, origin)).toBe('sent');
		await waitForMessage({ to: owner.email, subject: /dg-ax2-speed is now noncompliant/ });
		expect((await mailsTo(lead.email)).filter((m) => /is now/.test(m.subject))).toEqual([]);
		expect(await openDigests(r.em(), new Date(Date.now() + 86_400_000))).toBe(0);
	});
});
