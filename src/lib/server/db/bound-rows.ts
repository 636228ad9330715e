import { createHash } from 'node:crypto';
import type { EntityManager, Knex } from '@mikro-orm/postgresql';
import { withPooledClient } from './pooled-client';

/** `?` placeholders as PostgreSQL's `$1, $2, …` (the texts given here hold no `?` inside a literal). */
const numbered = (sql: string) => {
	let n = 0;
	return sql.replace(/\?/g, () => `$${++n}`);
};

/**
 * Rows of a read whose values travel as bound parameters (`?`), inside the entity manager's transaction when it has
 * one. MikroORM's `execute` first writes every value into the SQL text (`platform.formatQuery`): for the audit
 * search's list of ≈ 150 run ids that took longer than PostgreSQL's whole execution (≈ 3 of 6 ms at 100k records).
 *
 * `prepared`: outside a transaction, send it as a named statement, which each pooled connection parses once; after
 * five runs PostgreSQL may keep one generic plan for it. For a query planned far longer than it runs (the audit
 * search: ≈ 1.8 ms planning, 0.5 ms execution), that is most of its time. Only for texts drawn from a small fixed
 * set: each distinct text is one statement per connection for the connection's life.
 */
export async function boundRows<T>(
	em: EntityManager,
	sql: string,
	params: readonly unknown[] = [],
	opts: { prepared?: boolean } = {}
): Promise<T[]> {
	const tx = em.getTransactionContext<Knex.Transaction>();
	if (opts.prepared && !tx) {
		const text = numbered(sql);
		const name = `bs_${createHash('sha256').update(text).digest('hex').slice(0, 24)}`;
		return withPooledClient(
			em,
			async (client) => (await client.query({ name, text, values: [...params] })).rows as T[]
		);
	}
	const query = em
		.getConnection()
		.getKnex()
		.raw(sql, params as readonly Knex.Value[] as Knex.Value[]);
	if (tx) query.transacting(tx);
	return ((await query) as { rows: T[] }).rows;
}
