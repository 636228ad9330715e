import { execFile } from 'node:child_process';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import { withClient } from '../../scripts/lib/postgres';
import { hashLinkToken } from '../../src/lib/server/tokens';
import { testDbUrls } from './db-urls';
import { migrateDb } from './support/migrate';

const root = join(import.meta.dirname, '..', '..');

describe('npm run admin:create', () => {
	it('creates an admin with no password and prints a single-use welcome link that the database knows', async () => {
		const { appUrl, ownerUrl } = testDbUrls();
		await migrateDb(ownerUrl, appUrl);
		const email = `first-admin-${Date.now()}@shop.example`;
		const { stdout } = await promisify(execFile)(
			process.execPath,
			[
				join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs'),
				'scripts/create-admin.ts',
				'--email',
				email,
				'--name',
				'First Admin'
			],
			{ cwd: root, env: { ...process.env, DATABASE_URL: appUrl, ORIGIN: 'https://bench.shop.example' } }
		);
		const token = stdout.match(/https:\/\/bench\.shop\.example\/welcome\/([A-Za-z0-9_-]{43})/)?.[1];
		expect(token).toBeDefined();
		await withClient(ownerUrl, async (c) => {
			const user = await c.query<{ roles: string[]; password_hash: string | null }>(
				'select roles, password_hash from app_user where email = $1',
				[email]
			);
			expect(user.rows[0]).toEqual({ roles: ['admin'], password_hash: null });
			const link = await c.query<{ purpose: string; used_at: Date | null }>(
				'select purpose, used_at from one_time_token where token_hash = $1',
				[hashLinkToken(token!)]
			);
			expect(link.rows[0]).toEqual({ purpose: 'invite', used_at: null });
			const log = await c.query<{ action: string }>(`select action from admin_log where detail->>'email' = $1`, [
				email
			]);
			expect(log.rows.map((r) => r.action)).toEqual(['user.invited']);
		});
	});
});
