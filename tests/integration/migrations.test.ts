import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { schemaDrift } from '../../scripts/lib/migrate';
import { migrateDb } from './support/migrate';
import { scratchDatabase } from './support/scratch-db';
import { withClient } from '../../scripts/lib/postgres';

// A database of its own, created empty, so "up from empty" really starts from nothing.
const db = scratchDatabase('benchstamp_mig');

describe('migrations', () => {
	beforeAll(() => db.create());
	afterAll(() => db.drop());

	it('run up from an empty database and record every file', async () => {
		const applied = await migrateDb(db.ownerUrl, db.appUrl);
		expect(applied.length).toBeGreaterThanOrEqual(2);
		const tables = await withClient(db.ownerUrl, (c) =>
			c.query<{ tablename: string }>(`select tablename from pg_tables where schemaname = 'public' order by 1`)
		);
		expect(tables.rows.map((r) => r.tablename)).toEqual(
			expect.arrayContaining(['admin_log', 'app_user', 'one_time_token', 'rate_limit', 'mikro_orm_migrations'])
		);
		expect(await migrateDb(db.ownerUrl, db.appUrl)).toEqual([]);
	});

	it('leave no drift between the entities and the migrated schema', async () => {
		expect(await schemaDrift(db.ownerUrl)).toBe('');
	});

	it('let the app read but never write the migration record', async () => {
		await withClient(db.appUrl, async (c) => {
			const rows = await c.query('select name from mikro_orm_migrations');
			expect(rows.rows.length).toBeGreaterThanOrEqual(2);
			await expect(c.query(`insert into mikro_orm_migrations (name) values ('forged')`)).rejects.toThrow(
				/permission denied/
			);
		});
	});
});
