import type { Message } from '../transport';

// Plain text first: these land in company mail filters, and a bare link survives all of them.

export function invitationMail(input: { to: string; inviter: string; role: string; url: string; days: number }): Message {
	return {
		to: input.to,
		subject: 'You are invited to Headroom',
		text: [
			`${input.inviter} invited you to Headroom, the registry of our feedback loops' stability margins, as ${input.role}.`,
			'',
			'Choose your password here (the link works once, for ' + input.days + ' days):',
			input.url,
			'',
			'If your company signs you in with single sign-on, you can use that instead; the link is then not needed.',
			'If you did not expect this, ignore this message.'
		].join('\n')
	};
}

export function passwordResetMail(input: { to: string; url: string; minutes: number }): Message {
	return {
		to: input.to,
		subject: 'Reset your Headroom password',
		text: [
			'Someone asked to reset the password of your Headroom account.',
			'',
			'Choose a new password here (the link works once, for ' + input.minutes + ' minutes):',
			input.url,
			'',
			'If it was not you, ignore this message: your password stays as it is.'
		].join('\n')
	};
}
