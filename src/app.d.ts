// See https://svelte.dev/docs/kit/types#app.d.ts
import type { Role, Scope } from '$lib/auth/roles';

declare global {
	namespace App {
		interface Error {
			message: string;
			/** Quoted by the user to find the logged detail. */
			errorId?: string;
		}
		interface Locals {
			/** The signed-in user (from the session cookie or a bearer token), read fresh each request. */
			user: { id: string; email: string; name: string; role: Role } | null;
			/** Scopes granted to this request: a session has all its role allows; a token its own. */
			scopes: Scope[];
			requestId: string;
		}
		// interface PageData {}
		// interface PageState {}
		// interface Platform {}
	}
}

export {};
