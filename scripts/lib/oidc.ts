// A local OpenID Connect provider standing in for the company's single sign-on: oidc-provider on
// loopback with one confidential client and a fixed list of people. Its login page is a plain
// HTML form (e-mail + password) that Chromium and a fetch-with-cookies test can both fill in;
// consent is implied, as it is for a company's own applications.
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { generateKeyPairSync, randomBytes } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import Provider, { type Configuration, type KoaContextWithOIDC } from 'oidc-provider';
import { HOST } from './ports';

export interface OidcFakeUser {
	/** Stable subject identifier, as a real IdP would keep across e-mail changes. */
	sub: string;
	email: string;
	name: string;
	password: string;
	/** A real IdP may say an address is unverified; the app must refuse those. */
	emailVerified?: boolean;
}

export interface OidcFakeOptions {
	/** 0 picks a free port. */
	port: number;
	clientId: string;
	clientSecret: string;
	/** The app's Auth.js callback, e.g. http://127.0.0.1:3000/auth/callback/oidc. */
	redirectUri: string | string[];
	users?: OidcFakeUser[];
}

export interface OidcFake {
	issuer: string;
	users: OidcFakeUser[];
	stop(): Promise<void>;
}

export const OIDC_FAKE_PASSWORD = 'headroom-sso';

/** The demo people plus one the app has never seen, so a first SSO sign-in can be tried. */
export const DEFAULT_OIDC_USERS: OidcFakeUser[] = [
	...['viewer', 'engineer', 'lead', 'admin'].map((role) => ({
		sub: `sso-${role}`,
		email: `${role}@headroom.test`,
		name: `${role[0].toUpperCase()}${role.slice(1)} (SSO)`,
		password: OIDC_FAKE_PASSWORD
	})),
	{
		sub: 'sso-newcomer',
		email: 'newcomer@headroom.test',
		name: 'Nico Newcomer',
		password: OIDC_FAKE_PASSWORD
	}
];

const escape = (text: string) =>
	text.replace(
		/[&<>"']/g,
		(c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!
	);

function loginPage(uid: string, clientId: string, problem?: string): string {
	return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Company sign-in (local fake)</title>
<style>body{font-family:system-ui,sans-serif;max-width:24rem;margin:4rem auto;padding:0 1rem}
label{display:block;margin-top:1rem}input{width:100%;padding:.4rem;font-size:1rem}
button{margin-top:1.2rem;padding:.5rem 1rem;font-size:1rem}.problem{color:#b3261e}</style></head>
<body><h1>Company sign-in</h1><p>Local stand-in for single sign-on, asked by <code>${escape(clientId)}</code>.</p>
${problem ? `<p class="problem" role="alert">${escape(problem)}</p>` : ''}
<form method="post" action="/interaction/${escape(uid)}/login" autocomplete="off">
<label for="email">E-mail</label><input id="email" name="email" type="email" required autofocus>
<label for="password">Password</label><input id="password" name="password" type="password" required>
<button type="submit">Sign in</button></form></body></html>`;
}

async function readForm(req: IncomingMessage): Promise<URLSearchParams> {
	const chunks: Buffer[] = [];
	for await (const chunk of req) chunks.push(chunk as Buffer);
	return new URLSearchParams(Buffer.concat(chunks).toString('utf8'));
}

function send(res: ServerResponse, status: number, html: string) {
	res.writeHead(status, {
		'content-type': 'text/html; charset=utf-8',
		'cache-control': 'no-store'
	});
	res.end(html);
}

export async function startOidcFake(options: OidcFakeOptions): Promise<OidcFake> {
	const users = options.users ?? DEFAULT_OIDC_USERS;
	const server = createServer();
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(options.port, HOST, () => resolve());
	});
	const issuer = `http://${HOST}:${(server.address() as AddressInfo).port}`;

	// Fresh keys each start: nothing outside this process trusts them, so nothing is kept.
	const { privateKey } = generateKeyPairSync('rsa', { modulusLength: 2048 });
	const jwk = { ...privateKey.export({ format: 'jwk' }), kid: 'fake', alg: 'RS256', use: 'sig' };

	const configuration: Configuration = {
		clients: [
			{
				client_id: options.clientId,
				client_secret: options.clientSecret,
				redirect_uris: [options.redirectUri].flat(),
				grant_types: ['authorization_code'],
				response_types: ['code']
			}
		],
		jwks: { keys: [jwk as never] },
		cookies: { keys: [randomBytes(32).toString('base64url')] },
		claims: { openid: ['sub'], email: ['email', 'email_verified'], profile: ['name'] },
		features: { devInteractions: { enabled: false } },
		pkce: { required: () => false },
		interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
		async findAccount(_ctx, sub) {
			const user = users.find((u) => u.sub === sub);
			if (!user) return undefined;
			return {
				accountId: sub,
				claims: async () => ({
					sub,
					email: user.email,
					email_verified: user.emailVerified ?? true,
					name: user.name
				})
			};
		},
		// First-party sign-in: grant what the client asked for without a consent screen.
		async loadExistingGrant(ctx: KoaContextWithOIDC) {
			const accountId = ctx.oidc.session?.accountId;
			if (!accountId || !ctx.oidc.client) return undefined;
			const grant = new ctx.oidc.provider.Grant({ clientId: ctx.oidc.client.clientId, accountId });
			grant.addOIDCScope('openid email profile');
			await grant.save();
			return grant;
		},
		ttl: {
			Interaction: 600,
			Session: 3600,
			Grant: 3600,
			AuthorizationCode: 60,
			AccessToken: 600,
			IdToken: 600
		}
	};
	const provider = new Provider(issuer, configuration);
	const callback = provider.callback();

	server.on('request', (req, res) => {
		void (async () => {
			const url = new URL(req.url ?? '/', issuer);
			const match = /^\/interaction\/([\w-]+)(\/login)?$/.exec(url.pathname);
			if (!match) return callback(req, res);
			const details = await provider.interactionDetails(req, res);
			const clientId = String(details.params.client_id ?? '');
			if (!match[2] && req.method === 'GET')
				return send(res, 200, loginPage(details.uid, clientId));
			if (match[2] && req.method === 'POST') {
				const form = await readForm(req);
				const email = (form.get('email') ?? '').trim().toLowerCase();
				const user = users.find((u) => u.email.toLowerCase() === email && u.password === form.get('password'));
				if (!user)
					return send(
						res,
						401,
						loginPage(details.uid, clientId, 'Unknown e-mail or wrong password.')
					);
				return provider.interactionFinished(
					req,
					res,
					{ login: { accountId: user.sub } },
					{ mergeWithLastSubmission: false }
				);
			}
			send(res, 405, 'Method not allowed');
		})().catch((error: unknown) => {
			// An expired or unknown interaction (stale cookie, reused link) lands here.
			if (!res.headersSent)
				send(
					res,
					400,
					`<p>Sign-in request not valid: ${escape(String((error as Error).message))}</p>`
				);
		});
	});

	return {
		issuer,
		users,
		stop: () =>
			new Promise<void>((resolve) => {
				server.closeAllConnections();
				server.close(() => resolve());
			})
	};
}
