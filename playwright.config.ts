import { defineConfig } from '@playwright/test';

const port = Number(process.env.E2E_PORT ?? 4173);

// Debian's Chromium, never a downloaded browser. The flags keep it off the (closed) network.
export default defineConfig({
	testDir: 'tests/e2e',
	outputDir: 'test-results',
	fullyParallel: false,
	workers: 1,
	retries: 0,
	timeout: 60_000,
	reporter: [['list']],
	use: {
		baseURL: `http://localhost:${port}`,
		viewport: { width: 1440, height: 900 },
		launchOptions: {
			executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
			args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-quic', '--no-first-run']
		},
		trace: 'off',
		screenshot: 'only-on-failure'
	},
	webServer: {
		command: 'npx tsx tests/support/e2e-server.ts',
		url: `http://localhost:${port}/api/v1/health`,
		reuseExistingServer: false,
		timeout: 60_000,
		stdout: 'pipe',
		env: { E2E_PORT: String(port) }
	}
});
