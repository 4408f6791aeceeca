// The SMTP fake: maildev 2 on loopback, for `npm start` (web inbox) and for the tests (its REST
// API: GET /email lists parsed messages, DELETE /email/all empties the inbox). With a mail
// folder the inbox survives restarts.
import { join } from 'node:path';
import { HOST } from './ports';
import type { Child, Supervisor } from './processes';
import { waitForHttp, waitForTcp } from './wait';

export const MAIL_FROM = 'Headroom <no-reply@headroom.test>';

export interface MailFakeOptions {
	root: string;
	smtpPort: number;
	webPort: number;
	mailDir: string;
	name?: string;
}

export async function startMailFake(
	supervisor: Supervisor,
	options: MailFakeOptions
): Promise<Child> {
	const { root, smtpPort, webPort, mailDir } = options;
	const child = supervisor.start({
		name: options.name ?? 'mail',
		command: process.execPath,
		args: [
			join(root, 'node_modules/maildev/bin/maildev'),
			'--ip',
			HOST,
			'--web-ip',
			HOST,
			'--smtp',
			String(smtpPort),
			'--web',
			String(webPort),
			'--mail-directory',
			mailDir
		],
		cwd: root,
		env: process.env
	});
	await waitForTcp('the mail fake (SMTP)', HOST, smtpPort, { child, timeoutMs: 20_000 });
	await waitForHttp('the mail fake (web)', `http://${HOST}:${webPort}/healthz`, {
		child,
		timeoutMs: 20_000
	});
	return child;
}

export function mailEnv(smtpPort: number, webPort: number): Record<string, string> {
	return {
		SMTP_URL: `smtp://${HOST}:${smtpPort}`,
		MAIL_FROM,
		MAIL_INBOX_URL: `http://${HOST}:${webPort}`
	};
}
