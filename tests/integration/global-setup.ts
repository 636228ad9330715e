/**
 * Integration-test database. If TEST_DATABASE_URL and TEST_OWNER_DATABASE_URL are set (e.g. by the top-level
 * `npm test` orchestrator, which may share one cluster across test layers), they are used and nothing is started.
 * Otherwise a throwaway cluster is started in a fresh temporary directory on a free port, and the teardown stops it
 * and deletes the directory.
 */
import { chmod, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { TestProject } from 'vitest/node';
import { freePort, startCluster, stopCluster } from '../../scripts/lib/postgres';
import type { TestDbUrls } from './db-urls';

export default async function setup(project: TestProject): Promise<(() => Promise<void>) | undefined> {
	const given: Partial<TestDbUrls> = {
		appUrl: process.env.TEST_DATABASE_URL,
		ownerUrl: process.env.TEST_OWNER_DATABASE_URL,
		superuserUrl: process.env.TEST_SUPERUSER_DATABASE_URL || null
	};
	if (given.appUrl && given.ownerUrl) {
		project.provide('TEST_DATABASE_URL', given.appUrl);
		project.provide('TEST_OWNER_DATABASE_URL', given.ownerUrl);
		project.provide('TEST_SUPERUSER_DATABASE_URL', given.superuserUrl ?? null);
		return undefined;
	}

	// mkdtemp makes a 700 directory; the postgres OS user (when we run as root) must be able to traverse it.
	const baseDir = await mkdtemp(join(tmpdir(), `benchstamp-test-pg-${process.pid}-`));
	await chmod(baseDir, 0o755);
	const cleanup = async () => {
		await stopCluster(baseDir).catch((error: unknown) => console.error('stopping the test cluster failed:', error));
		await rm(baseDir, { recursive: true, force: true });
	};
	try {
		const urls = await startCluster({ baseDir, port: await freePort(), database: 'benchstamp_test', ephemeral: true });
		process.env.TEST_DATABASE_URL = urls.appUrl;
		process.env.TEST_OWNER_DATABASE_URL = urls.ownerUrl;
		process.env.TEST_SUPERUSER_DATABASE_URL = urls.superuserUrl;
		project.provide('TEST_DATABASE_URL', urls.appUrl);
		project.provide('TEST_OWNER_DATABASE_URL', urls.ownerUrl);
		project.provide('TEST_SUPERUSER_DATABASE_URL', urls.superuserUrl);
	} catch (error) {
		await cleanup();
		throw error;
	}
	return async () => {
		delete process.env.TEST_DATABASE_URL;
		delete process.env.TEST_OWNER_DATABASE_URL;
		delete process.env.TEST_SUPERUSER_DATABASE_URL;
		await cleanup();
	};
}
