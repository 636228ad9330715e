import { execFile } from 'node:child_process';
import { chmod, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ormOptions } from '../../mikro-orm.config';
import { freePort, startCluster, stopCluster, withClient, type ClusterUrls } from '../../scripts/lib/postgres';
import { makeRunWithFinding } from '../factories/runs';
import { migrateDb } from './support/migrate';

const root = join(import.meta.dirname, '..', '..');

/** Runs one of our scripts under tsx against the throwaway cluster; resolves with exit code and output. */
function script(name: string, args: string[], urls: ClusterUrls): Promise<{ code: number; out: string }> {
	return new Promise((resolve) => {
		execFile(
			process.execPath,
			[join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs'), join(root, 'scripts', name), ...args],
			{ cwd: root, env: { ...process.env, DATABASE_URL: urls.appUrl, OWNER_DATABASE_URL: urls.ownerUrl } },
			(err, stdout, stderr) => resolve({ code: err ? Number(err.code ?? 1) : 0, out: `${stdout}${stderr}` })
		);
	});
}

describe('npm run backup / restore on a throwaway cluster', () => {
	let baseDir: string;
	let urls: ClusterUrls;
	beforeAll(async () => {
		baseDir = await mkdtemp(join(tmpdir(), 'benchstamp-q3-backup-'));
		await chmod(baseDir, 0o755);
		urls = await startCluster({ baseDir, port: await freePort(), database: 'benchstamp', ephemeral: true });
		await migrateDb(urls.ownerUrl, urls.appUrl);
	}, 120_000);
	afterAll(async () => {
		await stopCluster(baseDir);
		await rm(baseDir, { recursive: true, force: true });
	});

	it('backup → drop every table → restore → verify intact, grants and append-only triggers back', async () => {
		const orm = await MikroORM.init(ormOptions(urls.appUrl));
		let runId: string;
		try {
			runId = (await makeRunWithFinding(orm)).runId;
		} finally {
			await orm.close(true);
		}

		const file = join(baseDir, 'b.dump');
		const backup = await script('backup.ts', [file], urls);
		expect(backup, backup.out).toMatchObject({ code: 0 });

		await withClient(urls.ownerUrl, async (c) => {
			const tables = await c.query<{ tablename: string }>(
				`select tablename from pg_tables where schemaname = 'public'`
			);
			expect(tables.rows.length).toBeGreaterThan(10);
			await c.query(`drop table ${tables.rows.map((t) => `"${t.tablename}"`).join(', ')} cascade`);
		});

		const restore = await script('restore.ts', [file], urls);
		expect(restore.code, restore.out).toBe(0);
		expect(restore.out).toMatch(/verify: intact — 1 runs, 2 records/);

		await withClient(urls.appUrl, async (c) => {
			const rows = await c.query<{ n: string }>(`select count(*) as n from ledger_record where run_id = $1`, [runId]);
			expect(Number(rows.rows[0].n)).toBe(2);
			await expect(c.query(`update ledger_record set kind = 'finding' where run_id = $1`, [runId])).rejects.toThrow();
		});
	}, 120_000);

	it('a restore of a missing file is refused with the reason', async () => {
		const r = await script('restore.ts', [join(baseDir, 'nope.dump')], urls);
		expect(r.code).toBe(1);
		expect(r.out).toContain('no such backup file');
	});
});
