/**
 * The benches' PostgreSQL: ONE throwaway cluster per `npm run bench` (temp directory, free port, fsync off, migrated
 * as the app is), started by the first bench that asks and stopped and deleted by {@link closeBenchDb} at the end.
 */
import { MikroORM } from '@mikro-orm/postgresql';
import { chmod, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ormOptions } from '../../mikro-orm.config';
import { freePort, startCluster, stopCluster } from '../../scripts/lib/postgres';
import { migrateDb } from '../integration/support/migrate';

/** Connections of the app's pool (and of the plain-INSERT side of the throughput ratio). */
export const POOL = 4;

export interface BenchDb {
	orm: MikroORM;
	appUrl: string;
	ownerUrl: string;
}

let started: { baseDir: string; db: Promise<BenchDb> } | undefined;

async function start(baseDir: string): Promise<BenchDb> {
	await chmod(baseDir, 0o755); // the postgres OS user must reach it when run as root
	const urls = await startCluster({ baseDir, port: await freePort(), database: 'benchstamp', ephemeral: true });
	await migrateDb(urls.ownerUrl, urls.appUrl);
	// The services read their settings (e.g. the offline grant's sealing key) from the environment.
	process.env.DATABASE_URL ??= urls.appUrl;
	process.env.AUTH_SECRET ??= 'bench-only-secret-0123456789abcdef0123';
	process.env.BENCHSTAMP_MODE ??= 'demo';
	const orm = await MikroORM.init({ ...ormOptions(urls.appUrl), pool: { min: 1, max: POOL } });
	return { orm, appUrl: urls.appUrl, ownerUrl: urls.ownerUrl };
}

/** The bench cluster, started on first use. */
export async function benchDb(): Promise<BenchDb> {
	if (!started) {
		const baseDir = await mkdtemp(join(tmpdir(), 'benchstamp-bench-'));
		started = { baseDir, db: start(baseDir) };
	}
	return started.db;
}

let closing: Promise<void> | undefined;

/**
 * Closes the ORM, stops the cluster and deletes its directory (nothing when no bench started it). Every call waits
 * for the same close: a signal's cleanup and the runner's `finally` may both ask.
 */
export function closeBenchDb(): Promise<void> {
	closing ??= close();
	return closing;
}

async function close(): Promise<void> {
	if (!started) return;
	const { baseDir, db } = started;
	started = undefined;
	await (await db.catch(() => undefined))?.orm.close(true);
	await stopCluster(baseDir).catch(() => undefined);
	await rm(baseDir, { recursive: true, force: true });
}
