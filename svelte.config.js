import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	kit: {
		adapter: adapter({ out: 'build' }),
		// CSRF protection stays on (SvelteKit's default origin check for form posts).
		alias: {
			$metrology: 'src/lib/metrology',
			$plateau: 'src/lib/plateau'
		}
	}
};

export default config;
