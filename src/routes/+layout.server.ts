import type { LayoutServerLoad } from './$types';

// Only what the shell needs to draw itself; pages guard their own data (a layout load is not a
// guard: it does not rerun on every request).
export const load = (async ({ locals }) => {
	return { user: locals.user };
}) satisfies LayoutServerLoad;
