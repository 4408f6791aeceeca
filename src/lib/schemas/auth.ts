/** Form schemas for sign-in, users and tokens; shared by the server actions and the browser. */
import { z } from 'zod';
import { ROLES, SCOPES } from '$lib/auth/roles';

const email = z.email('Enter an e-mail address.').max(320).trim().toLowerCase();

export const PASSWORD_MIN = 10;

export const signInSchema = z.object({
	email,
	password: z.string().min(1, 'Enter your password.').max(1000),
	next: z.string().max(2000).default('/')
});

export const resetRequestSchema = z.object({ email });

export const setPasswordSchema = z
	.object({
		password: z
			.string()
			.min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
			.max(1000, 'That is too long.'),
		confirm: z.string()
	})
	.refine((v) => v.password === v.confirm, { message: 'The two entries differ.', path: ['confirm'] });

export const inviteSchema = z.object({
	email,
	name: z.string().trim().max(200).default(''),
	role: z.enum(ROLES).default('viewer')
});

export const userIdSchema = z.object({ userId: z.uuid() });

export const roleChangeSchema = z.object({ userId: z.uuid(), role: z.enum(ROLES) });

export const tokenCreateSchema = z.object({
	name: z.string().trim().min(1, 'Name the token after where it will be used.').max(100),
	scopes: z.array(z.enum(SCOPES)).min(1, 'Choose at least one scope.').default(['read'])
});

export const tokenRevokeSchema = z.object({ tokenId: z.uuid() });
