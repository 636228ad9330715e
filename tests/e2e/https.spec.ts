import { spawn } from 'node:child_process';
import { X509Certificate } from 'node:crypto';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, expect, request, test } from '@playwright/test';
import { freePort } from '../../scripts/lib/postgres';
import { spkiSha256 } from '../../scripts/lib/tls';
import { DEMO, signIn } from './support';

// An invented shop-network name, resolved to loopback by Chromium only (nothing is looked up on any network).
const HOST = 'bench.kestrel-lane.test';

// Its own HTTPS server (scripts/https-server.ts around the same build) on the seeded demo database, with a local CA
// made for this test; Chromium trusts the server certificate by its public key (SPKI allow-list), as a tablet that
// installed the CA would.
test('over HTTPS under a LAN name the app is a secure context: Web Crypto, service worker and sign-in work', async () => {
	test.setTimeout(90_000);
	const dir = await mkdtemp(join(tmpdir(), 'benchstamp-https-'));
	const port = await freePort();
	const server = spawn(process.execPath, ['--import', 'tsx', 'scripts/https-server.ts'], {
		env: {
			// No ORIGIN: over HTTPS the app takes its origin from the Host header, so any LAN name works.
			...Object.fromEntries(Object.entries(process.env).filter(([k]) => k !== 'ORIGIN')),
			BENCHSTAMP_MODE: 'demo',
			DATABASE_URL: process.env.E2E_DATABASE_URL ?? '',
			AUTH_SECRET: 'https-e2e-secret-that-is-long-enough-0123456789',
			PORT: String(port),
			HOST: '127.0.0.1',
			TLS_DIR: join(dir, 'tls'),
			TLS_NAMES: HOST,
			MAIL_DIR: join(dir, 'mail'),
			FAKE_SMTP_PORT: String(await freePort()),
			FAKE_S3_PORT: '0',
			FAKE_S3_DIR: join(dir, 's3'),
			BODY_SIZE_LIMIT: '11M'
		},
		stdio: ['ignore', 'inherit', 'inherit']
	});
	const exited = new Promise<number | null>((r) => server.on('exit', (code) => r(code)));
	const browser = await chromium.launch({
		executablePath: '/usr/bin/chromium',
		args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run']
	});
	try {
		const probe = await request.newContext({ ignoreHTTPSErrors: true });
		await expect
			.poll(async () => (await probe.get(`https://127.0.0.1:${port}/api/health`).catch(() => null))?.status(), {
				timeout: 45_000
			})
			.toBe(200);
		await probe.dispose();

		const leaf = await readFile(join(dir, 'tls', 'server.crt'), 'utf8');
		const caPem = await readFile(join(dir, 'tls', 'ca.crt'), 'utf8');
		const ca = new X509Certificate(caPem);
		expect(new X509Certificate(leaf).verify(ca.publicKey)).toBe(true);
		expect(new X509Certificate(leaf).subjectAltName).toContain(`DNS:${HOST}`);
		await browser.close();

		const trusting = await chromium.launch({
			executablePath: '/usr/bin/chromium',
			args: [
				'--no-sandbox',
				'--disable-gpu',
				'--disable-background-networking',
				'--no-first-run',
				`--host-resolver-rules=MAP ${HOST} 127.0.0.1`,
				`--ignore-certificate-errors-spki-list=${spkiSha256(leaf)}`
			]
		});
		try {
			const page = await (await trusting.newContext({ viewport: { width: 820, height: 1180 } })).newPage();
			const base = `https://${HOST}:${port}`;
			await page.goto(`${base}/tls`);
			await expect(page.getByTestId('ca-fingerprint')).toHaveText(ca.fingerprint256);
			// Fetched by the page itself: only Chromium resolves the test name.
			const download = await page.evaluate(async () => {
				const r = await fetch('/tls/ca.crt');
				return { status: r.status, type: r.headers.get('content-type'), text: await r.text() };
			});
			expect(download).toEqual({ status: 200, type: 'application/x-x509-ca-cert', text: caPem });
			expect(download.text).not.toContain('PRIVATE KEY');

			await signIn(page, DEMO.technician.email, undefined, `${base}/signin`);
			await expect(page).toHaveURL(`${base}/bench`);
			expect(
				await page.evaluate(() => ({
					secure: window.isSecureContext,
					subtle: typeof crypto.subtle?.generateKey === 'function',
					protocol: location.protocol
				}))
			).toEqual({ secure: true, subtle: true, protocol: 'https:' });
			const scope = await page.evaluate(async () => (await navigator.serviceWorker.ready).scope);
			expect(scope).toBe(`${base}/`);
			const cookies = await page.context().cookies(base);
			expect(cookies.filter((c) => /session/i.test(c.name)).every((c) => c.secure)).toBe(true);
		} finally {
			await trusting.close();
		}
	} finally {
		await browser.close().catch(() => {});
		server.kill('SIGTERM');
		expect(await exited).toBe(0);
		await rm(dir, { recursive: true, force: true });
	}
});
