import { sequence } from '@sveltejs/kit/hooks';
import { building } from '$app/environment';
import { handleRequestId } from '$lib/server/hooks/request-id';
import { handleSecurityHeaders } from '$lib/server/hooks/security-headers';
import { closeOrm } from '$lib/server/db/orm';
import { stopBoss } from '$lib/server/jobs/boss';

export { handleError } from '$lib/server/hooks/error';

export const handle = sequence(handleRequestId, handleSecurityHeaders);

if (!building) {
	// adapter-node emits this on SIGINT/SIGTERM once requests have drained; without closing the
	// pools the process would never exit.
	process.on('sveltekit:shutdown', async () => {
		await Promise.allSettled([stopBoss(), closeOrm()]);
	});
}
