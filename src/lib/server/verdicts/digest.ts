/**
 * Daily verdict digests. A lead may choose one message a day instead of a message per change
 * (owners always get immediate mail). Once a day the scheduled job opens a digest for each such
 * lead: an outbox row (verdict_digest) claiming every worse change of their classes not yet
 * listed, and a send job, in one transaction. The send job marks the row sent only after the
 * message went out, so an SMTP outage delays a digest and loses nothing; a day without worse
 * verdicts opens nothing and sends nothing.
 *
 * Which changes a digest-choosing lead gets by digest and which by immediate mail is decided by
 * `verdict_mail_since` (when the current choice began): changes after it go to the digest,
 * changes before it were the immediate mail's (see leadGetsImmediateMail). Switching back to
 * immediate mail first opens a last digest with whatever was still unlisted.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { enqueueInTx } from '../jobs/enqueue';
import { QUEUES } from '../jobs/queues';
import { demandRole, type Actor } from '../registry/common';
import { sendMail } from '../mail/transport';
import { verdictDigestMail, type DigestLoop } from '../mail/templates/digest';
import type { CriterionResult } from '../../compliance/judge';
import type { VerdictMailMode } from '../db/entities';

/** Changes committed later than the last digest was opened still count, up to this late. */
const LATE_COMMIT = '1 day';

const exec = <T extends object[]>(tx: EntityManager, sql: string, params: unknown[] = []) =>
	tx.getConnection().execute(sql, params, 'all', tx.getTransactionContext()) as Promise<T>;

/**
 * Claim one lead's unlisted worse changes into a new digest and enqueue its sending. Runs in the
 * caller's transaction; the user row is locked, so two passes cannot both claim the same changes.
 */
async function openDigestInTx(tx: EntityManager, userId: string, until: Date): Promise<string | null> {
	const [user] = await exec<{ verdict_mail_since: string | null; last_until: string | null }[]>(
		tx,
		`select u.verdict_mail_since, (select max(d.until) from verdict_digest d where d.user_id = u.id) as last_until
		 from app_user u where u.id = ? for update`,
		[userId]
	);
	if (!user?.verdict_mail_since) return null;
	const since = new Date(user.verdict_mail_since);
	const lower = user.last_until ? new Date(user.last_until) : since;
	const [{ id }] = await exec<{ id: string }[]>(tx, 'select gen_random_uuid() as id');
	// Only changes after the choice began; the lower bound keeps the scan to the recent past.
	const claimed = await exec<{ id: string; loop_id: string }[]>(
		tx,
		`select e.id, e.loop_id from verdict_event e
		 join loop l on l.id = e.loop_id join loop_class c on c.id = l.loop_class_id
		 where c.lead_id = ? and e.worse and e.digest_id is null
		   and e.at > ? and e.at > ?::timestamptz - interval '${LATE_COMMIT}' and e.at <= ?`,
		[userId, since, lower, until]
	);
	if (!claimed.length) return null;
	const loops = new Set(claimed.map((c) => c.loop_id)).size;
	await exec(tx, 'insert into verdict_digest (id, user_id, since, until, loop_count) values (?, ?, ?, ?, ?)', [
		id,
		userId,
		lower < until ? lower : new Date(until.getTime() - 1),
		until,
		loops
	]);
	await exec(tx, `update verdict_event set digest_id = ? where id in (select value::uuid from jsonb_array_elements_text(?::jsonb))`, [
		id,
		JSON.stringify(claimed.map((c) => c.id))
	]);
	await enqueueInTx(tx, QUEUES.sendDigest, { digestId: id }, { tag: id });
	return id;
}

/** The scheduled daily pass: one digest for every active lead who chose it and has news. */
export async function openDigests(em: EntityManager, now = new Date()): Promise<number> {
	const leads = await em
		.getConnection()
		.execute<{ id: string }[]>(`select id from app_user where verdict_mail = 'digest' and active`);
	let opened = 0;
	for (const { id } of leads) {
		if (await em.transactional((tx) => openDigestInTx(tx, id, now))) opened++;
	}
	return opened;
}

export interface VerdictMailSetting {
	mode: VerdictMailMode;
	since: Date | null;
}

export async function verdictMailSetting(em: EntityManager, userId: string): Promise<VerdictMailSetting> {
	const [row] = await em
		.getConnection()
		.execute<{ verdict_mail: VerdictMailMode; verdict_mail_since: string | null }[]>(
			'select verdict_mail, verdict_mail_since from app_user where id = ?',
			[userId]
		);
	return { mode: row?.verdict_mail ?? 'immediate', since: row?.verdict_mail_since ? new Date(row.verdict_mail_since) : null };
}

/**
 * A lead chooses how they hear of worse verdicts. Leaving the digest opens a last one with what
 * it had not listed yet, so nothing falls between the two ways.
 */
export async function setVerdictMail(em: EntityManager, actor: Actor, mode: VerdictMailMode, now = new Date()): Promise<VerdictMailSetting> {
	demandRole(actor, 'lead', 'choose a daily digest (owners always get a message per change)');
	await em.transactional(async (tx) => {
		const [row] = await exec<{ verdict_mail: VerdictMailMode }[]>(tx, 'select verdict_mail from app_user where id = ? for update', [actor.id]);
		if (!row || row.verdict_mail === mode) return;
		if (row.verdict_mail === 'digest') await openDigestInTx(tx, actor.id, now);
		await exec(tx, 'update app_user set verdict_mail = ?, verdict_mail_since = ? where id = ?', [mode, now, actor.id]);
	});
	return verdictMailSetting(em, actor.id);
}

/**
 * Whether a verdict change goes to the class's lead by immediate mail: always, unless it belongs
 * to a digest — listed in one already, or made while the lead's current digest choice holds.
 */
export function leadGetsImmediateMail(lead: { mode: VerdictMailMode; since: Date | null }, event: { at: Date; digestId: string | null }): boolean {
	if (event.digestId) return false;
	if (lead.mode === 'immediate') return true;
	return lead.since !== null && event.at <= lead.since;
}

interface DigestRow {
	email: string;
	name: string;
	active: boolean;
	since: string;
	until: string;
	sent_at: string | null;
}

interface DigestEventRow {
	loop_id: string;
	loop_key: string;
	loop_name: string;
	product_name: string;
	previous_verdict: string;
	verdict: string;
	revision_number: number | null;
	criteria: CriterionResult[];
}

/** The send job: one message for one digest row, marked sent only once it went out. */
export async function sendDigest(em: EntityManager, digestId: string, origin: string): Promise<'sent' | 'skipped'> {
	const conn = em.getConnection();
	const [digest] = await conn.execute<DigestRow[]>(
		`select u.email, u.name, u.active, d.since, d.until, d.sent_at
		 from verdict_digest d join app_user u on u.id = d.user_id where d.id = ?`,
		[digestId]
	);
	if (!digest || digest.sent_at) return 'skipped';
	const events = await conn.execute<DigestEventRow[]>(
		`select l.id as loop_id, l.key as loop_key, l.name as loop_name, p.name as product_name,
		        e.previous_verdict, e.verdict, r.number as revision_number, e.criteria
		 from verdict_event e join loop l on l.id = e.loop_id join product p on p.id = l.product_id
		 left join revision r on r.id = e.revision_id
		 where e.digest_id = ? order by p.name, l.key, e.at, e.id`,
		[digestId]
	);
	// One entry per loop: from the verdict before its first change to the one after its last.
	const loops = new Map<string, DigestLoop>();
	for (const e of events) {
		const first = loops.get(e.loop_id);
		loops.set(e.loop_id, {
			loopKey: e.loop_key,
			loopName: e.loop_name,
			productName: e.product_name,
			from: first?.from ?? e.previous_verdict,
			verdict: e.verdict,
			revisionNumber: e.revision_number,
			criteria: e.criteria,
			url: `${origin}/loops/${e.loop_id}`
		});
	}
	if (digest.active && loops.size) {
		await sendMail(
			verdictDigestMail({
				to: digest.email,
				name: digest.name,
				since: new Date(digest.since),
				until: new Date(digest.until),
				loops: [...loops.values()],
				settingsUrl: `${origin}/settings/notifications`
			})
		);
	}
	await conn.execute('update verdict_digest set sent_at = now() where id = ? and sent_at is null', [digestId]);
	return digest.active && loops.size ? 'sent' : 'skipped';
}
