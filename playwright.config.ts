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
	// Generous: CI is a 2-core machine running two app servers and Chromium at once; a slow step is not a failure.
	timeout: 90_000,
	expect: { timeout: 15_000 },
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
		// A failure keeps its trace with DOM snapshots (the page at each step) but no screencast: recording one keeps the
		// compositor painting and encoding frames the whole test (6,000 JPEGs in the chaos test), CPU a 2-core CI lacks.
		trace: { mode: 'retain-on-failure', screenshots: false }
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
				FAKE_SMTP_PORT: process.env.E2E_SMTP_PORT ?? '2599',
				// The app starts its own S3 fake on a free port (kept in memory), storing beside the run's mail folder.
				FAKE_S3_PORT: '0',
				FAKE_S3_DIR: process.env.E2E_MAIL_DIR ? `${process.env.E2E_MAIL_DIR}-s3` : '.data/e2e-s3',
				// adapter-node refuses bodies over 512 KB by default; photos are up to 10 MiB plus the form around them.
				BODY_SIZE_LIMIT: '11M',
				// Idle keep-alive seconds (Node's default 5): Playwright's pooled request sockets drop 1 s before the
				// announced timeout, but a test process starved on 2 cores misses that and reuses a socket the server
				// just closed (ECONNRESET). Shutdown closes idle connections at once, so this does not slow stopping.
				KEEP_ALIVE_TIMEOUT: '600'
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
				SMTP_URL: 'smtp://127.0.0.1:9',
				// Object storage nobody listens on, for the same reason: production never starts the S3 fake.
				S3_ENDPOINT: 'http://127.0.0.1:9',
				S3_BUCKET: 'benchstamp-e2e',
				S3_ACCESS_KEY_ID: 'e2e-unused',
				S3_SECRET_ACCESS_KEY: 'e2e-unused',
				BODY_SIZE_LIMIT: '11M',
				KEEP_ALIVE_TIMEOUT: '600'
			}
		}
	]
});
