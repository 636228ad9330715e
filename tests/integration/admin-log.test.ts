import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as adminLog from '../../src/lib/server/repositories/admin-log';
import { withClient } from '../../scripts/lib/postgres';
import { testDbUrls } from './db-urls';
import { migratedAppOrm } from './support/orm';

describe('admin log (append-only)', () => {
	let orm: MikroORM;
	let id: string;
	beforeAll(async () => {
		orm = await migratedAppOrm();
		const em = orm.em.fork();
		const row = adminLog.append(
			em,
			{ id: crypto.randomUUID(), name: 'Test Admin' },
			{ action: 'user.roles_changed', subjectType: 'user', subjectId: 'x' }
		);
		await em.flush();
		id = row.id;
	});
	afterAll(() => orm.close(true));

	it('accepts INSERT and SELECT from the app role', async () => {
		await withClient(testDbUrls().appUrl, async (c) => {
			const rows = await c.query<{ action: string }>('select action from admin_log where id = $1', [id]);
			expect(rows.rows[0]?.action).toBe('user.roles_changed');
		});
	});

	it.each([
		['UPDATE', `update admin_log set action = 'forged' where id = $1`],
		['DELETE', `delete from admin_log where id = $1`]
	])('refuses %s from the app role (no privilege)', async (_op, sql) => {
		await withClient(testDbUrls().appUrl, async (c) => {
			await expect(c.query(sql, [id])).rejects.toThrow(/permission denied/);
		});
	});

	it.each([
		['UPDATE', `update admin_log set action = 'forged' where id = $1`],
		['DELETE', `delete from admin_log where id = $1`],
		['TRUNCATE', `truncate admin_log`]
	])('refuses %s even from the owner role (trigger)', async (_op, sql) => {
		await withClient(testDbUrls().ownerUrl, async (c) => {
			await expect(c.query(sql, sql.includes('$1') ? [id] : [])).rejects.toThrow(/append-only/);
			const rows = await c.query<{ action: string }>('select action from admin_log where id = $1', [id]);
			expect(rows.rows[0]?.action).toBe('user.roles_changed');
		});
	});
});
