import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { schemaDrift } from '../../scripts/lib/migrate';
import { migrateDb } from './support/migrate';
import { withClient } from '../../scripts/lib/postgres';
import { testDbUrls } from './db-urls';

// A database of its own, created empty, so "up from empty" really starts from nothing.
const name = `benchstamp_mig_${process.pid}_${Date.now().toString(36)}`;
const urls = testDbUrls();
const withDb = (url: string) => {
	const u = new URL(url);
	u.pathname = `/${name}`;
	return u.toString();
};

describe('migrations', () => {
	beforeAll(async () => {
		if (!urls.superuserUrl) throw new Error('this test needs TEST_SUPERUSER_DATABASE_URL to create an empty database');
		await withClient(urls.superuserUrl, async (c) => {
			await c.query(`create database ${name} owner benchstamp_owner`);
			await c.query(`revoke all on database ${name} from public`);
			await c.query(`grant connect on database ${name} to benchstamp_app`);
		});
	});
	afterAll(async () => {
		await withClient(urls.superuserUrl!, (c) => c.query(`drop database if exists ${name} with (force)`));
	});

	it('run up from an empty database and record every file', async () => {
		const applied = await migrateDb(withDb(urls.ownerUrl), withDb(urls.appUrl));
		expect(applied.length).toBeGreaterThanOrEqual(2);
		const tables = await withClient(withDb(urls.ownerUrl), (c) =>
			c.query<{ tablename: string }>(`select tablename from pg_tables where schemaname = 'public' order by 1`)
		);
		expect(tables.rows.map((r) => r.tablename)).toEqual(
			expect.arrayContaining(['admin_log', 'app_user', 'one_time_token', 'rate_limit', 'mikro_orm_migrations'])
		);
		expect(await migrateDb(withDb(urls.ownerUrl), withDb(urls.appUrl))).toEqual([]);
	});

	it('leave no drift between the entities and the migrated schema', async () => {
		expect(await schemaDrift(withDb(urls.ownerUrl))).toBe('');
	});

	it('let the app read but never write the migration record', async () => {
		await withClient(withDb(urls.appUrl), async (c) => {
			const rows = await c.query('select name from mikro_orm_migrations');
			expect(rows.rows.length).toBeGreaterThanOrEqual(2);
			await expect(c.query(`insert into mikro_orm_migrations (name) values ('forged')`)).rejects.toThrow(
				/permission denied/
			);
		});
	});
});
