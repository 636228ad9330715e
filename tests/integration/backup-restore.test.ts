import { execFile } from 'node:child_process';
import { chmod, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ormOptions } from '../../mikro-orm.config';
import { freePort, startCluster, stopCluster, withClient, type ClusterUrls } from '../../scripts/lib/postgres';
import type { IUser } from '../../src/lib/server/db/entities';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { migrateDb } from './support/migrate';

const root = join(import.meta.dirname, '..', '..');
const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

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
			const made = await makeRun(orm.em.fork());
			runId = made.runId;
			const r = await submitRecords(
				orm.em.fork(),
				viewer(made.tech),
				made.runId,
				submitBatchSchema.parse({
					records: [
						record(made.runId, made.tech, 'attempt', boreAttempt('22.010')),
						record(made.runId, made.tech, 'finding', { stepIndex: 0, text: 'Scoring in bore 1.' })
					],
					pins: { [made.tech.id]: PIN }
				})
			);
			expect(r.ok && r.value.answers.map((a) => a.status)).toEqual(['accepted', 'accepted']);
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
