import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	server: { port: 5173, strictPort: false },
	test: {
		include: ['src/**/*.spec.ts', 'bench-simulator/**/*.spec.ts', 'tests/integration/**/*.spec.ts'],
		environment: 'node',
		testTimeout: 30_000,
		pool: 'forks'
	}
});
