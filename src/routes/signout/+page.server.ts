import { signOutForm } from '$lib/server/auth/actions';
import type { Actions } from './$types';

// Public on purpose: someone whose account was just deactivated must still be able to drop the
// cookie. Signing out an anonymous visitor does nothing.
export const actions = {
	default: async (event) => signOutForm(event)
} satisfies Actions;
