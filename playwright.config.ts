import { defineConfig } from '@playwright/test';

const PORT = Number(process.env.E2E_PORT ?? 4173);

// End-to-end tests drive the built app (vite build + node build) in Debian's Chromium. The server
// script gives every run a fresh database with the demo plant in it.
export default defineConfig({
	testDir: 'tests/e2e',
	outputDir: 'test-results/e2e',
	timeout: 60_000,
	expect: { timeout: 10_000 },
	workers: 2,
	retries: process.env.CI ? 1 : 0,
	reporter: [['list']],
	use: {
		baseURL: `http://127.0.0.1:${PORT}`,
		screenshot: 'on',
		trace: 'retain-on-failure',
		launchOptions: {
			executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
			args: [
				'--no-sandbox',
				'--disable-gpu',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync',
				'--no-first-run'
			]
		}
	},
	webServer: {
		command: 'npx tsx scripts/e2e-server.ts',
		url: `http://127.0.0.1:${PORT}/sign-in`,
		timeout: 180_000,
		reuseExistingServer: false,
		env: { E2E_PORT: String(PORT) },
		stdout: 'pipe',
		stderr: 'pipe'
	}
});
