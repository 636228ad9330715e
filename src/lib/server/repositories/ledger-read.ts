/**
 * Reads of the ledger for verification, as plain rows (no entity hydrated): one run's chain, or every chain in
 * `(run_id, seq)` order, in pages walked by keyset on the `(run_id, seq)` unique index so memory stays bounded by
 * one page and the largest run. Through `em.execute`: inside the caller's transaction when there is one.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { JsonValue } from '../../ledger/jcs';
import type { StoredRecord } from '../../ledger/record';

interface Row {
	id: string;
	run_id: string;
	seq: number;
	kind: string;
	body: JsonValue;
	prev_hash: string | null;
	hash: string;
}

const COLUMNS = `"id", "run_id", "seq", "kind", "body", "prev_hash", "hash"`;

const toStored = (r: Row): StoredRecord => ({
	id: r.id,
	runId: r.run_id,
	seq: r.seq,
	kind: r.kind as StoredRecord['kind'],
	body: r.body,
	prevHash: r.prev_hash,
	hash: r.hash
});

/** A run's records in chain order (`ORDER BY seq`), as `verifyChain` takes them. */
export async function chainOf(em: EntityManager, runId: string): Promise<StoredRecord[]> {
	const rows = await em.execute<Row[]>(`select ${COLUMNS} from "ledger_record" where "run_id" = ? order by "seq"`, [
		runId
	]);
	return rows.map(toStored);
}

/** One run's chain as {@link chainsInOrder} yields it. */
export interface RunChain {
	runId: string;
	records: StoredRecord[];
}

/**
 * Every run's chain that has records, in `run_id` order, each in `seq` order. Pages of `page` rows; a run cut by a
 * page boundary is yielded once, whole, after the next page. The next page is fetched while the caller works on this
 * one (a second pooled connection).
 */
export async function* chainsInOrder(em: EntityManager, page = 2_000): AsyncGenerator<RunChain> {
	const fetch = (after: Row | null) =>
		after
			? em.execute<Row[]>(
					`select ${COLUMNS} from "ledger_record" where ("run_id", "seq") > (?, ?) order by "run_id", "seq" limit ?`,
					[after.run_id, after.seq, page]
				)
			: em.execute<Row[]>(`select ${COLUMNS} from "ledger_record" order by "run_id", "seq" limit ?`, [page]);
	let current: RunChain | null = null;
	let pending: Promise<Row[]> | null = fetch(null);
	while (pending) {
		const rows: Row[] = await pending;
		// The next page is read while this one is verified.
		pending = rows.length === page ? fetch(rows[rows.length - 1]) : null;
		for (const row of rows) {
			if (current && current.runId !== row.run_id) {
				yield current;
				current = null;
			}
			current ??= { runId: row.run_id, records: [] };
			current.records.push(toStored(row));
		}
	}
	if (current) yield current;
}
