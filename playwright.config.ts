import { defineConfig } from '@playwright/test';

// Ports, databases and the mail folder come from scripts/test.ts, which starts the throwaway PostgreSQL.
const appPort = Number(process.env.E2E_APP_PORT ?? 4173);
const prodPort = Number(process.env.E2E_PROD_PORT ?? 4174);
const buildDir = process.env.BENCHSTAMP_BUILD_DIR ?? 'build';
const secret = 'e2e-auth-secret-that-is-long-enough-0123456789';

export default defineConfig({
	testDir: 'tests/e2e',
	outputDir: process.env.BENCHSTAMP_PW_OUT ?? 'test-results',
	fullyParallel: false,
	workers: 1,
	retries: 0,
	timeout: 30_000,
	reporter: [['list']],
	use: {
		baseURL: `http://localhost:${appPort}`,
		launchOptions: {
			executablePath: '/usr/bin/chromium',
			args: [
				'--no-sandbox',
				'--disable-gpu',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync',
				'--no-first-run'
			]
		},
		trace: 'retain-on-failure'
	},
	webServer: [
		{
			command: `node ${buildDir}`,
			url: `http://localhost:${appPort}/api/health`,
			reuseExistingServer: false,
			timeout: 60_000,
			env: {
				BENCHSTAMP_MODE: 'demo',
				DATABASE_URL: process.env.E2E_DATABASE_URL ?? '',
				AUTH_SECRET: secret,
				PORT: String(appPort),
				HOST: '127.0.0.1',
				ORIGIN: `http://localhost:${appPort}`,
				MAIL_DIR: process.env.E2E_MAIL_DIR ?? '.data/e2e-mail',
				FAKE_SMTP_PORT: process.env.E2E_SMTP_PORT ?? '2599'
			}
		},
		{
			command: `node ${buildDir}`,
			url: `http://localhost:${prodPort}/api/health`,
			reuseExistingServer: false,
			timeout: 60_000,
			env: {
				BENCHSTAMP_MODE: 'production',
				DATABASE_URL: process.env.E2E_PROD_DATABASE_URL ?? '',
				AUTH_SECRET: `${secret}-prod`,
				PORT: String(prodPort),
				HOST: '127.0.0.1',
				ORIGIN: `http://localhost:${prodPort}`,
				// A relay nobody listens on: production must never fall back to the fake server.
				SMTP_URL: 'smtp://127.0.0.1:9'
			}
		}
	]
});
