import type { EntityManager, Knex } from '@mikro-orm/postgresql';

/**
 * Rows of a read whose values travel as bound parameters (`?`), inside the entity manager's transaction when it has
 * one. MikroORM's `execute` first writes every value into the SQL text (`platform.formatQuery`): for the audit
 * search's list of ≈ 150 run ids that took longer than PostgreSQL's whole execution (≈ 3 of 6 ms at 100k records).
 */
export async function boundRows<T>(em: EntityManager, sql: string, params: readonly unknown[] = []): Promise<T[]> {
	const query = em
		.getConnection()
		.getKnex()
		.raw(sql, params as readonly Knex.Value[] as Knex.Value[]);
	const tx = em.getTransactionContext<Knex.Transaction>();
	if (tx) query.transacting(tx);
	return ((await query) as { rows: T[] }).rows;
}
