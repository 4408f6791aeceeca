import type { ServerInit } from '@sveltejs/kit';
import { building } from '$app/environment';
import { handleRequestId } from '$lib/server/hooks/request-id';
import { handleSecurityHeaders } from '$lib/server/hooks/security-headers';
import { handleAuth } from '$lib/server/hooks/auth';
import { handleCsrf } from '$lib/server/hooks/csrf';
import { handleOutage } from '$lib/server/hooks/outage';
import { handleRegistryWrites } from '$lib/server/hooks/registry-writes';
import { chain } from '$lib/server/hooks/chain';
import { authSecret, databaseUrl, oidcSettings, registryCacheEnabled } from '$lib/server/config';
import { startRegistryChanges, stopRegistryChanges } from '$lib/server/db/registry-changes';
import { closeOrm } from '$lib/server/db/orm';
import { stopBoss } from '$lib/server/jobs/boss';

export { handleError } from '$lib/server/hooks/error';

// Refuse to start with a missing AUTH_SECRET in production (or half an SSO configuration)
// rather than fail on the first sign-in.
export const init: ServerInit = async () => {
	authSecret();
	oidcSettings();
	// Not awaited: the server answers (uncached) while PostgreSQL is still out of reach.
	if (!building && registryCacheEnabled()) void startRegistryChanges(databaseUrl());
};

export const handle = chain(
	handleRequestId,
	handleSecurityHeaders,
	handleOutage,
	handleCsrf,
	handleRegistryWrites,
	handleAuth
);

if (!building) {
	// adapter-node emits this on SIGINT/SIGTERM once requests have drained; without closing the
	// pools the process would never exit.
	process.on('sveltekit:shutdown', async () => {
		await Promise.allSettled([stopBoss(), closeOrm(), stopRegistryChanges()]);
	});
}
