import { spawn } from 'node:child_process';
import { chmod, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expect, test } from '@playwright/test';
import { freePort, startCluster, stopCluster } from '../../scripts/lib/postgres';
import { migrateDb } from '../integration/support/migrate';

// A server and a database of its own, because this test stops the database under it and then the server.
test('health is 503 with the database down, and SIGTERM closes the pool and exits', async ({ request }) => {
	test.setTimeout(90_000);
	const base = await mkdtemp(join(tmpdir(), 'benchstamp-health-'));
	await chmod(base, 0o755);
	try {
		const db = await startCluster({ baseDir: base, port: await freePort(), database: 'benchstamp', ephemeral: true });
		await migrateDb(db.ownerUrl, db.appUrl);
		const port = await freePort();
		const server = spawn(process.execPath, [process.env.BENCHSTAMP_BUILD_DIR ?? 'build'], {
			env: {
				...process.env,
				BENCHSTAMP_MODE: 'production',
				SMTP_URL: 'smtp://127.0.0.1:9',
				// Production demands object storage too; nobody listens here, and this test uploads nothing.
				S3_BUCKET: 'benchstamp-e2e',
				S3_ENDPOINT: 'http://127.0.0.1:9',
				DATABASE_URL: db.appUrl,
				AUTH_SECRET: 'health-test-secret-that-is-long-enough-123',
				PORT: String(port),
				HOST: '127.0.0.1',
				ORIGIN: `http://localhost:${port}`
			},
			stdio: 'ignore'
		});
		const exited = new Promise<number | null>((r) => server.on('exit', (code) => r(code)));
		const url = `http://localhost:${port}/api/health`;
		await expect.poll(async () => (await request.get(url).catch(() => null))?.status(), { timeout: 20_000 }).toBe(200);

		await stopCluster(base);
		const down = await request.get(url);
		expect(down.status()).toBe(503);
		expect(await down.json()).toMatchObject({ status: 'degraded', db: 'unreachable' });

		const started = Date.now();
		server.kill('SIGTERM');
		expect(await exited).toBe(0);
		expect(Date.now() - started).toBeLessThan(15_000);
	} finally {
		await stopCluster(base).catch(() => {});
		await rm(base, { recursive: true, force: true });
	}
});
