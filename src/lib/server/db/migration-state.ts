import type { MikroORM } from '@mikro-orm/postgresql';

/** Applied migrations as recorded in the database; the app's role may read but never write this table. */
export async function migrationState(orm: MikroORM): Promise<{ applied: number; latest: string | null }> {
	const rows = await orm.em
		.getConnection()
		.execute<{ name: string }[]>('select name from mikro_orm_migrations order by id desc', [], 'all');
	return { applied: rows.length, latest: rows[0]?.name ?? null };
}
