import type { EntityManager } from '@mikro-orm/postgresql';
import type { Client } from 'pg';

/**
 * `fn` with a `pg` client of the ORM's own pool (knex's), released afterwards whatever happens: for the few reads and
 * writes that need the driver itself — a named statement, a two-statement simple query, a COPY stream. Never inside
 * the entity manager's transaction: the client is another connection.
 */
export async function withPooledClient<T>(em: EntityManager, fn: (client: Client) => Promise<T>): Promise<T> {
	const pool = em.getConnection().getKnex().client as {
		acquireConnection(): Promise<Client>;
		releaseConnection(c: Client): Promise<unknown>;
	};
	const client = await pool.acquireConnection();
	try {
		return await fn(client);
	} finally {
		await pool.releaseConnection(client);
	}
}
