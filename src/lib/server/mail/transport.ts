import nodemailer, { type Transporter } from 'nodemailer';
import { mailFrom, smtpUrl } from '../config';

let transporter: Transporter | undefined;
let transporterUrl = '';

/**
 * SMTP through nodemailer; locally the fake SMTP server on loopback (no TLS, no auth). Built
 * again when SMTP_URL changes (read when asked for, like every setting).
 */
export function mailer(): Transporter {
	if (!transporter || transporterUrl !== smtpUrl()) {
		transporter?.close();
		transporterUrl = smtpUrl();
		const url = new URL(transporterUrl);
		const local = url.hostname === '127.0.0.1' || url.hostname === 'localhost';
		transporter = nodemailer.createTransport({
			host: url.hostname,
			port: Number(url.port || 25),
			secure: url.protocol === 'smtps:',
			ignoreTLS: local,
			auth: url.username
				? { user: decodeURIComponent(url.username), pass: decodeURIComponent(url.password) }
				: undefined,
			connectionTimeout: 5_000,
			greetingTimeout: 5_000
		});
	}
	return transporter;
}

export interface Message {
	to: string;
	subject: string;
	text: string;
	html?: string;
}

export async function sendMail(message: Message): Promise<void> {
	await mailer().sendMail({ from: mailFrom(), ...message });
}
