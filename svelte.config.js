import adapter from '@sveltejs/adapter-node';
import { readFileSync } from 'node:fs';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

const { version } = JSON.parse(readFileSync(new URL('./package.json', import.meta.url), 'utf8'));

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	kit: {
		adapter: adapter({ out: 'build' }),
		// The cross-origin check is ours (src/lib/server/hooks/csrf.ts): the same rule as
		// SvelteKit's, except for API calls with a bearer token (pipelines upload with curl -F).
		csrf: { trustedOrigins: ['*'] },
		version: { name: version }
	}
};

export default config;
