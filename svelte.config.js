import adapter from '@sveltejs/adapter-node';
import { readFileSync } from 'node:fs';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

const { version } = JSON.parse(readFileSync(new URL('./package.json', import.meta.url), 'utf8'));

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	kit: {
		adapter: adapter({ out: 'build' }),
		// Form actions keep SvelteKit's own cross-origin check (on by default); see STACK.md.
		csrf: { trustedOrigins: [] },
		version: { name: version }
	}
};

export default config;
