/**
 * Deliver the e-mail of a verdict that got worse, to the loop's owner and its class's lead (unless
 * that lead chose the daily digest, see digest.ts). The
 * verdict_event row is the outbox: `notified_at` is set only after the message went out, so when
 * the SMTP server is down the job fails, pg-boss retries it later, and nothing is lost.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { sendMail } from '../mail/transport';
import { verdictWorseMail } from '../mail/templates/verdict';
import type { CriterionResult } from '../../compliance/judge';
import type { VerdictMailMode } from '../db/entities';
import { leadGetsImmediateMail } from './digest';

interface EventRow {
	id: string;
	verdict: string;
	previous_verdict: string;
	criteria: CriterionResult[];
	notified_at: Date | null;
	at: string;
	digest_id: string | null;
	loop_id: string;
	loop_key: string;
	loop_name: string;
	product_name: string;
	revision_number: number | null;
	owner_email: string | null;
	lead_email: string | null;
	lead_mail: VerdictMailMode | null;
	lead_mail_since: string | null;
}

export async function notifyVerdict(em: EntityManager, eventId: string, origin: string): Promise<'sent' | 'skipped'> {
	const [event] = await em.getConnection().execute<EventRow[]>(
		`select e.id, e.verdict, e.previous_verdict, e.criteria, e.notified_at, e.at, e.digest_id, l.id as loop_id, l.key as loop_key,
		        l.name as loop_name, p.name as product_name, r.number as revision_number,
		        (select u.email from app_user u where u.id = l.owner_id and u.active) as owner_email,
		        lead.email as lead_email, lead.verdict_mail as lead_mail, lead.verdict_mail_since as lead_mail_since
		 from verdict_event e join loop l on l.id = e.loop_id join product p on p.id = l.product_id
		 join loop_class c on c.id = l.loop_class_id left join revision r on r.id = e.revision_id
		 left join app_user lead on lead.id = c.lead_id and lead.active
		 where e.id = ?`,
		[eventId]
	);
	if (!event || event.notified_at) return 'skipped';
	const leadNow =
		event.lead_email &&
		leadGetsImmediateMail(
			{ mode: event.lead_mail ?? 'immediate', since: event.lead_mail_since ? new Date(event.lead_mail_since) : null },
			{ at: new Date(event.at), digestId: event.digest_id }
		);
	const recipients = [...new Set([event.owner_email, leadNow ? event.lead_email : null].filter((e): e is string => !!e))];
	for (const to of recipients) {
		await sendMail(
			verdictWorseMail({
				to,
				loopKey: event.loop_key,
				loopName: event.loop_name,
				productName: event.product_name,
				from: event.previous_verdict,
				verdict: event.verdict,
				revisionNumber: event.revision_number,
				criteria: event.criteria,
				url: `${origin}/loops/${event.loop_id}`
			})
		);
	}
	await em.getConnection().execute('update verdict_event set notified_at = now() where id = ? and notified_at is null', [eventId]);
	return 'sent';
}
