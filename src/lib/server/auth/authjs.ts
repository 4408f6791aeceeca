/**
 * Auth.js: the session cookie (an encrypted JWT holding only our user id and the sign-in time)
 * and the two ways in: e-mail + password, and the company's OpenID Connect provider. Who the
 * user is and what they may do is read from our tables on every request (hooks/auth.ts), never
 * from the cookie, so a role change or a deactivation applies at once.
 */
import { SvelteKitAuth, CredentialsSignin, type SvelteKitAuthConfig } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import type { OIDCConfig } from '@auth/core/providers';
import type { Profile } from '@auth/core/types';
import type { RequestEvent } from '@sveltejs/kit';
import { appOrigin, authSecret, oidcSettings, type OidcSettings } from '../config';
import { forkEm } from '../db/orm';
import { signInWithPassword, signInWithSso } from './sign-in';

declare module '@auth/core/types' {
	interface Session {
		/** Epoch ms of the sign-in this session came from; compared with User.sessionsValidFrom. */
		signedInAt?: number;
	}
}
declare module '@auth/core/jwt' {
	interface JWT {
		signedInAt?: number;
	}
}

export const OIDC_PROVIDER_ID = 'oidc';

/** Refused password sign-ins; `code` is all the sign-in page learns ('invalid' | 'rate_limited'). */
class SignInRefused extends CredentialsSignin {
	constructor(code: 'invalid' | 'rate_limited') {
		super();
		this.code = code;
	}
}

function passwordProvider(event: RequestEvent) {
	return Credentials({
		credentials: { email: {}, password: {} },
		async authorize(credentials) {
			const outcome = await signInWithPassword(await forkEm(), {
				email: String(credentials.email ?? ''),
				password: String(credentials.password ?? ''),
				// adapter-node: the socket's peer, or ADDRESS_HEADER's value behind a proxy.
				address: event.getClientAddress()
			});
			if (!outcome.ok) throw new SignInRefused(outcome.reason);
			return outcome.user;
		}
	});
}

function oidcProvider(settings: OidcSettings): OIDCConfig<Profile> {
	return {
		id: OIDC_PROVIDER_ID,
		name: settings.name,
		type: 'oidc',
		issuer: settings.issuer,
		clientId: settings.clientId,
		clientSecret: settings.clientSecret,
		authorization: { params: { scope: 'openid email profile' } },
		checks: ['pkce', 'state', 'nonce'],
		// Claims from the userinfo endpoint: many IdPs leave e-mail and name out of the id token.
		idToken: false,
		profile: (profile) => ({ id: profile.sub ?? undefined, email: profile.email, name: profile.name })
	};
}

/** Whether the sign-in page should offer single sign-on. */
export function ssoName(): string | undefined {
	return oidcSettings()?.name;
}

function config(event: RequestEvent): SvelteKitAuthConfig {
	const oidc = oidcSettings();
	return {
		providers: [passwordProvider(event), ...(oidc ? [oidcProvider(oidc)] : [])],
		secret: authSecret(),
		session: { strategy: 'jwt', maxAge: 7 * 24 * 3600, updateAge: 3600 },
		// adapter-node builds request URLs from ORIGIN; Auth.js is told to accept them as they come.
		trustHost: true,
		// __Secure- cookie names and the Secure flag whenever users reach us over https.
		useSecureCookies: appOrigin().startsWith('https:'),
		// Our pages instead of Auth.js's built-in ones.
		pages: { signIn: '/signin', signOut: '/signout', error: '/signin' },
		callbacks: {
			async signIn({ user, account, profile }) {
				if (account?.provider !== OIDC_PROVIDER_ID) return true;
				const ours = await signInWithSso(await forkEm(), {
					email: profile?.email,
					emailVerified: profile?.email_verified,
					name: profile?.name
				});
				if (!ours) return false;
				// The session carries our id, not the IdP's subject.
				user.id = ours.id;
				return true;
			},
			jwt({ token, user, trigger }) {
				if (trigger === 'signIn' || trigger === 'signUp') {
					// Start from nothing: name, e-mail and picture stay out of the cookie.
					return { sub: user.id, signedInAt: Date.now() };
				}
				return token;
			},
			session({ session, token }) {
				return { expires: session.expires, user: { id: token.sub }, signedInAt: token.signedInAt };
			}
		},
		logger: {
			error(error) {
				// Wrong passwords and refused SSO accounts are expected answers, not server faults.
				const type = (error as { type?: string }).type;
				if (type === 'CredentialsSignin' || type === 'AccessDenied') return;
				console.error('[auth]', error);
			},
			warn(code) {
				if (code !== 'debug-enabled') console.warn('[auth] warning:', code);
			},
			debug() {}
		}
	};
}

export const { handle: handleAuthJs, signIn, signOut } = SvelteKitAuth(async (event) => config(event));
