// Local stand-in for the company's single sign-on (an OpenID Connect provider on loopback).
//   tsx scripts/oidc-fake.ts --port 4580 --client-id headroom --client-secret S \
//       --redirect-uri http://127.0.0.1:3000/auth/callback/oidc
// People: OIDC_FAKE_USERS (a JSON array of { sub, email, name, password }) or, by default, the
// demo addresses plus newcomer@headroom.test, all with password "headroom-sso".
import { parseArgs } from 'node:util';
import { startOidcFake, type OidcFakeUser } from './lib/oidc';

const { values } = parseArgs({
	options: {
		port: { type: 'string', default: '4580' },
		'client-id': { type: 'string', default: process.env.OIDC_CLIENT_ID ?? 'headroom' },
		'client-secret': { type: 'string', default: process.env.OIDC_CLIENT_SECRET },
		'redirect-uri': { type: 'string', multiple: true }
	}
});

const clientSecret = values['client-secret'];
const redirectUri = values['redirect-uri'];
if (!clientSecret || !redirectUri?.length) {
	console.error('usage: oidc-fake --port N --client-id ID --client-secret S --redirect-uri URL [--redirect-uri URL]');
	process.exit(2);
}
const users = process.env.OIDC_FAKE_USERS
	? (JSON.parse(process.env.OIDC_FAKE_USERS) as OidcFakeUser[])
	: undefined;

const fake = await startOidcFake({
	port: Number(values.port),
	clientId: values['client-id']!,
	clientSecret,
	redirectUri,
	users
});
console.log(`OpenID provider fake at ${fake.issuer} (${fake.users.map((u) => u.email).join(', ')})`);

for (const signal of ['SIGINT', 'SIGTERM'] as const) {
	process.once(signal, () => {
		void fake.stop().then(() => process.exit(0));
	});
}
