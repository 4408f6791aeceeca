/**
 * Messages the SMTP fake of `npm test` received (maildev 2; REST API at TEST_MAIL_API_URL).
 * The inbox is shared by every test file, so pick messages by a recipient unique to the test:
 *
 *   const mail = await waitForMessage({ to: user.email, subject: /reset/i });
 *   expect(mail.text).toContain('/reset?token=');
 */
import { testEnv } from './env';

export interface MailAddress {
	address: string;
	name: string;
}

/** The parts of maildev's parsed message that tests use (the JSON carries more). */
export interface MailMessage {
	id: string;
	subject: string;
	from: MailAddress[];
	to: MailAddress[];
	cc?: MailAddress[];
	/** Envelope recipients: the only place a Bcc shows up. */
	envelope: { from: string | { address: string }; to: (string | { address: string })[] | string };
	date: string;
	/** Decoded bodies (quoted-printable and base64 undone). */
	text?: string;
	html?: string;
	headers: Record<string, string>;
	attachments: { fileName: string; contentType: string; length: number }[] | null;
}

export interface MessageFilter {
	to?: string;
	subject?: string | RegExp;
	/** Further condition on the whole message. */
	where?: (message: MailMessage) => boolean;
}

async function api(path: string, init?: RequestInit): Promise<Response> {
	const response = await fetch(`${testEnv.mailApiUrl}${path}`, init);
	if (!response.ok)
		throw new Error(`mail fake ${init?.method ?? 'GET'} ${path}: HTTP ${response.status}`);
	return response;
}

export async function listMessages(): Promise<MailMessage[]> {
	return (await (await api('/email')).json()) as MailMessage[];
}

/** Empties the shared inbox; only safe in a file that owns every address it checks. */
export async function clearMessages(): Promise<void> {
	await api('/email/all', { method: 'DELETE' });
}

/** Raw RFC 822 source, for checks on headers maildev does not parse. */
export async function messageSource(id: string): Promise<string> {
	return (await api(`/email/${encodeURIComponent(id)}/source`)).text();
}

function recipients(message: MailMessage): string[] {
	const envelope = message.envelope?.to;
	const fromEnvelope = (Array.isArray(envelope) ? envelope : envelope ? [envelope] : []).map((r) =>
		typeof r === 'string' ? r : r.address
	);
	return [...(message.to ?? []), ...(message.cc ?? [])]
		.map((a) => a.address)
		.concat(fromEnvelope)
		.map((a) => a.toLowerCase());
}

export function matches(message: MailMessage, filter: MessageFilter): boolean {
	if (filter.to && !recipients(message).includes(filter.to.toLowerCase())) return false;
	if (typeof filter.subject === 'string' && message.subject !== filter.subject) return false;
	if (filter.subject instanceof RegExp && !filter.subject.test(message.subject ?? '')) return false;
	return filter.where ? filter.where(message) : true;
}

/** Polls until a matching message arrives (sending is asynchronous in the app and the fake). */
export async function waitForMessage(
	filter: MessageFilter,
	timeoutMs = 15_000
): Promise<MailMessage> {
	const deadline = Date.now() + timeoutMs;
	for (;;) {
		const found = (await listMessages()).find((m) => matches(m, filter));
		if (found) return found;
		if (Date.now() > deadline) {
			const seen = (await listMessages()).map(
				(m) => `${m.to?.map((a) => a.address).join(',')}: ${m.subject}`
			);
			throw new Error(
				`no mail matching ${JSON.stringify({ ...filter, subject: String(filter.subject ?? '') })} within ${timeoutMs / 1000}s; inbox: ${seen.join(' | ') || 'empty'}`
			);
		}
		await new Promise((resolve) => setTimeout(resolve, 200));
	}
}
