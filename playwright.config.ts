import { defineConfig } from '@playwright/test';

// `npm test` builds the app, serves it on the test port and sets TEST_APP_URL.
export default defineConfig({
	testDir: 'tests/e2e',
	fullyParallel: false,
	workers: 1,
	retries: 0,
	timeout: 60_000,
	reporter: [['list']],
	use: {
		baseURL: process.env.TEST_APP_URL ?? 'http://127.0.0.1:3100',
		trace: 'retain-on-failure',
		launchOptions: {
			executablePath: '/usr/bin/chromium',
			args: [
				'--no-sandbox',
				'--headless',
				'--disable-gpu',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync',
				'--no-first-run'
			]
		}
	}
});
