/**
 * Reads of the ledger for verification, as plain rows (no entity hydrated).
 *
 * Normally verify hashes each record's stored canonical text (`canonical`, from which PostgreSQL generates `body`):
 * one run's chain through `em.execute` (inside the caller's transaction when there is one), or every record in heap
 * order through one binary `COPY` — one statement, so one snapshot, and no per-field decoding.
 * Should the `body` column ever stop being generated from that text (someone with direct access to the database
 * dropping the expression), the text no longer proves what is shown, and verify reads and re-encodes the bodies
 * instead: {@link hashSource} says which.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { to as copyTo } from 'pg-copy-streams';
import type { JsonValue } from '../../ledger/jcs';
import type { ChainLink, StoredRecord } from '../../ledger/record';
import { CopyBinaryReader } from '../db/copy-binary';
import { withPooledClient } from '../db/pooled-client';
import type { StoredText } from '../ledger-hash';

/**
 * 'text' while `ledger_record.body` is still generated from `canonical` (as the migration made it), else 'body'. Read
 * from PostgreSQL's catalogue at each verify: a column changed by hand is found on the next check.
 */
export async function hashSource(em: EntityManager): Promise<'text' | 'body'> {
	const rows = await em.execute<{ generated: string }[]>(
		`select "attgenerated" as "generated" from "pg_attribute" where "attrelid" = '"ledger_record"'::regclass and "attname" = 'body' and not "attisdropped"`
	);
	return rows[0]?.generated === 's' ? 'text' : 'body';
}

/** The columns a chain is checked on, as PostgreSQL names them. */
interface LinkRow {
	id: string;
	run_id: string;
	seq: number;
	kind: string;
	prev_hash: string | null;
	hash: string;
}

interface BodyRow extends LinkRow {
	body: JsonValue;
}

interface TextRow extends LinkRow {
	canonical: string;
}

/** A row's chain fields under the ledger's names. */
function linkOf(r: LinkRow): ChainLink {
	return {
		id: r.id,
		runId: r.run_id,
		seq: r.seq,
		kind: r.kind as ChainLink['kind'],
		prevHash: r.prev_hash,
		hash: r.hash
	};
}

/** A run's records in chain order with their bodies, as `verifyChain` takes them with `serverRecordHash`. */
export async function chainOf(em: EntityManager, runId: string): Promise<StoredRecord[]> {
	const rows = await em.execute<BodyRow[]>(
		`select "id", "run_id", "seq", "kind", "body", "prev_hash", "hash" from "ledger_record" where "run_id" = ? order by "seq"`,
		[runId]
	);
	return rows.map((r) => ({ ...linkOf(r), body: r.body }));
}

/** A run's records in chain order with their stored canonical text, for `verifyChain` with `storedTextHash`. */
export async function textChainOf(em: EntityManager, runId: string): Promise<StoredText[]> {
	const rows = await em.execute<TextRow[]>(
		`select "id", "run_id", "seq", "kind", "canonical", "prev_hash", "hash" from "ledger_record" where "run_id" = ? order by "seq"`,
		[runId]
	);
	return rows.map((r) => ({ ...linkOf(r), canonical: r.canonical }));
}

/** One run's chain as {@link chainsInOrder} yields it. */
export interface RunChain<R> {
	runId: string;
	records: R[];
}

/** Groups rows that arrive in `(run_id, seq)` order into one chain per run. */
class ChainGrouper<R extends { runId: string }> {
	private current: RunChain<R> | null = null;

	/** The chain `row` closes, if it starts another run. */
	add(row: R): RunChain<R> | null {
		let closed: RunChain<R> | null = null;
		if (this.current && this.current.runId !== row.runId) {
			closed = this.current;
			this.current = null;
		}
		this.current ??= { runId: row.runId, records: [] };
		this.current.records.push(row);
		return closed;
	}

	end(): RunChain<R> | null {
		return this.current;
	}
}

/**
 * Every run's chain that has records, in `run_id` order, each in `seq` order, with bodies: pages of `page` rows by
 * keyset on the `(run_id, seq)` unique index, the next page fetched while the caller works on this one.
 */
export async function* chainsInOrder(em: EntityManager, page = 2_000): AsyncGenerator<RunChain<StoredRecord>> {
	const fetch = (after: BodyRow | null) =>
		after
			? em.execute<BodyRow[]>(
					`select "id", "run_id", "seq", "kind", "body", "prev_hash", "hash" from "ledger_record" where ("run_id", "seq") > (?, ?) order by "run_id", "seq" limit ?`,
					[after.run_id, after.seq, page]
				)
			: em.execute<BodyRow[]>(
					`select "id", "run_id", "seq", "kind", "body", "prev_hash", "hash" from "ledger_record" order by "run_id", "seq" limit ?`,
					[page]
				);
	const chains = new ChainGrouper<StoredRecord>();
	let pending: Promise<BodyRow[]> | null = fetch(null);
	while (pending) {
		const rows: BodyRow[] = await pending;
		pending = rows.length === page ? fetch(rows[rows.length - 1]) : null;
		for (const r of rows) {
			const closed = chains.add({ ...linkOf(r), body: r.body });
			if (closed) yield closed;
		}
	}
	const last = chains.end();
	if (last) yield last;
}

/**
 * The COPY {@link eachTextRecord} reads: every record, in whatever order the heap holds them — through the
 * `(run_id, seq)` index the same COPY delivered 2.3× fewer records a second (audit bench, 100k records), the table's
 * pages then being read in the order runs were created rather than as they lie.
 */
export const TEXT_COPY =
	`copy (select "run_id"::text, "seq", "id"::text, "kind", "prev_hash", "hash", "canonical" ` +
	`from "ledger_record") to stdout (format binary)`;

/**
 * Calls `onRecord` for every stored record, in heap order (a run's records need not arrive together, nor in `seq`
 * order), with the canonical text as the bytes PostgreSQL sent (a view of the stream's chunk, valid only during the
 * call, never decoded): one binary `COPY` — one statement, so one snapshot — on a pooled connection of its own, read
 * as it streams, so PostgreSQL produces rows while this process hashes them. Should `onRecord` throw, the rest of
 * the data is still read (so the connection goes back to the pool clean) and then the error is thrown.
 */
export async function eachTextRecord(em: EntityManager, onRecord: (record: StoredText) => void): Promise<void> {
	await withPooledClient(em, async (client) => {
		// Without this, a seq scan may start where another one running on the table has got to, so the newest records
		// come first and the screen holds every later record of the older runs until the scan wraps round.
		await client.query('begin read only');
		try {
			await client.query('set local synchronize_seqscans = off');
		} catch (error) {
			await client.query('rollback');
			throw error;
		}
		const stream = client.query(copyTo(TEXT_COPY));
		const reader = new CopyBinaryReader();
		let failure: { error: unknown } | null = null;
		// UTF-8, as `pg` decodes the same columns for verifyRun: the envelope must be compared with the text the
		// database holds, not a misreading of it (latin1 would turn a forged non-ASCII kind into the one hashed).
		const text = (buf: Buffer, f: Int32Array, i: number) => buf.toString('utf8', f[2 * i], f[2 * i] + f[2 * i + 1]);
		async function readRows() {
			for await (const chunk of stream as AsyncIterable<Buffer>) {
				reader.each(chunk, (buf, f, count) => {
					if (failure) return;
					try {
						if (count !== 7 || f[1] === -1 || f[3] !== 4 || f[5] === -1 || f[7] === -1 || f[11] === -1 || f[13] === -1)
							throw new Error('A ledger row came without one of its chain columns.');
						onRecord({
							runId: text(buf, f, 0),
							seq: buf.readInt32BE(f[2]),
							id: text(buf, f, 2),
							kind: text(buf, f, 3) as StoredText['kind'],
							prevHash: f[9] === -1 ? null : text(buf, f, 4),
							hash: text(buf, f, 5),
							canonical: buf.subarray(f[12], f[12] + f[13])
						});
					} catch (error) {
						failure = { error };
					}
				});
			}
		}
		try {
			await readRows();
		} catch (error) {
			// The COPY stopped part-way (bytes that are not binary COPY, a broken connection): the connection may still be
			// in COPY mode, so it is closed — the pool then discards it instead of handing it to the next query.
			await client.end().catch(() => {});
			throw error;
		}
		await client.query('commit');
		reader.finish();
		if (failure) throw (failure as { error: unknown }).error;
	});
}
