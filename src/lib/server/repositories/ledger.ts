import type { EntityManager } from '@mikro-orm/postgresql';
import type { SealedRecord, StoredRecord } from '../../ledger/record';
import { LedgerRecord, type ILedgerRecord, type IRun } from '../db/entities';
import { withPooledClient } from '../db/pooled-client';

/** One stored record by its client id (in any run), or null. */
export function findById(em: EntityManager, id: string): Promise<ILedgerRecord | null> {
	return em.findOne(LedgerRecord, { id });
}

/** A run's records in chain order (`ORDER BY seq`), as verification reads them. */
export function listForRun(em: EntityManager, runId: string): Promise<ILedgerRecord[]> {
	return em.find(LedgerRecord, { run: runId }, { orderBy: { seq: 'asc' } });
}

/** The hashed envelope of a stored row, as `verifyChain` takes it. */
export function toStored(r: ILedgerRecord): StoredRecord {
	return {
		id: r.id,
		runId: (r.run as unknown as IRun).id,
		seq: r.seq,
		kind: r.kind as StoredRecord['kind'],
		body: r.body,
		prevHash: r.prevHash ?? null,
		hash: r.hash
	};
}

/** What is stored beside the envelope. */
export interface RecordColumns {
	submissionHash: string;
	signerId: string | null;
	signerRole: string;
	deviceId: string | null;
	deviceTime: Date | null;
	serverTime: Date;
	engineVersion: string;
	signedOffline: boolean;
}

/**
 * Queues the INSERT of an appended record (the only write the ledger ever sees). Call with the run's row lock held
 * (`runs.lockForAppend`), and advance the run's head in the same transaction.
 */
export function insert(tx: EntityManager, run: IRun, record: SealedRecord, columns: RecordColumns): ILedgerRecord {
	const row = tx.create(LedgerRecord, {
		id: record.id,
		run,
		seq: record.seq,
		kind: record.kind,
		canonical: record.canonical,
		prevHash: record.prevHash,
		hash: record.hash,
		...columns
	});
	run.headHash = record.hash;
	run.recordCount = record.seq;
	return row;
}

/** What a resend check needs of a stored record: no entity hydrated. */
export interface KnownRecord {
	id: string;
	runId: string;
	seq: number;
	hash: string;
	submissionHash: string;
}

/** The stored records among `ids` (in any run), by id: one query for a whole batch's duplicate check. */
export async function findKnown(em: EntityManager, ids: readonly string[]): Promise<Map<string, KnownRecord>> {
	const out = new Map<string, KnownRecord>();
	if (ids.length === 0) return out;
	const rows = await em
		.getConnection()
		.execute<{ id: string; run_id: string; seq: number; hash: string; submission_hash: string }[]>(
			`select "id", "run_id", "seq", "hash", "submission_hash" from "ledger_record" where "id" in (${ids.map(() => '?').join(', ')})`,
			[...ids]
		);
	for (const r of rows)
		out.set(r.id, { id: r.id, runId: r.run_id, seq: r.seq, hash: r.hash, submissionHash: r.submission_hash });
	return out;
}

/**
 * An admin-log entry whose presence stops an append, checked by the INSERT statement itself (so with the snapshot of
 * that statement, taken after the run's row lock was granted): e.g. a lead's decision that moved the run.
 */
export interface UnlessLogged {
	action: string;
	subjectType: string;
	subjectId: string;
	/** Contained in the entry's detail (`detail @> …`). */
	detail: Record<string, string>;
}

/** The columns of a ledger row, in the order of {@link recordValues} (one list for the fast and the full path). */
const RECORD_COLUMNS = [
	'id',
	'run_id',
	'seq',
	'kind',
	'canonical',
	'prev_hash',
	'hash',
	'submission_hash',
	'signer_id',
	'signer_role',
	'device_id',
	'device_time',
	'server_time',
	'engine_version',
	'signed_offline'
]
	.map((n) => `"${n}"`)
	.join(', ');
/** `?` placeholders for {@link recordValues}, with the casts the values need. */
const RECORD_PLACEHOLDERS = '?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?::timestamptz, ?::timestamptz, ?, ?';

/** The values of {@link RECORD_COLUMNS} for one appended record. */
function recordValues(record: SealedRecord, c: RecordColumns): unknown[] {
	return [
		record.id,
		record.runId,
		record.seq,
		record.kind,
		record.canonical,
		record.prevHash,
		record.hash,
		c.submissionHash,
		c.signerId,
		c.signerRole,
		c.deviceId,
		c.deviceTime?.toISOString() ?? null,
		c.serverTime.toISOString(),
		c.engineVersion,
		c.signedOffline
	];
}

/**
 * The INSERT of an appended record and the advance of its run's head, as one statement in `tx` (no unit-of-work
 * changeset): the submit route's hot path. Call with the run's row lock held (`runs.lockForAppend`). The in-memory
 * `run` is NOT touched (so the transaction's closing flush has nothing to write for it): a caller that goes on to
 * flush other changes sets `run.headHash`/`recordCount` itself. A reused id or seq fails on the primary key /
 * unique constraints (`UniqueConstraintViolationException`) and nothing is stored. Returns false (nothing stored)
 * when `unlessLogged` names an entry that exists.
 */
export async function insertAndAdvance(
	tx: EntityManager,
	run: IRun,
	record: SealedRecord,
	c: RecordColumns,
	opts: { unlessLogged?: UnlessLogged } = {}
): Promise<boolean> {
	const u = opts.unlessLogged;
	const guard = u
		? ` where not exists (select 1 from "admin_log" where "action" = ? and "subject_type" = ? and "subject_id" = ? and "detail" @> ?::jsonb)`
		: '';
	const result = await tx.execute<{ affectedRows: number }>(
		`with "ins" as (insert into "ledger_record" (${RECORD_COLUMNS}) select ${RECORD_PLACEHOLDERS}${guard} ` +
			`returning "id") update "run" set "head_hash" = ?, "record_count" = ?, "updated_at" = ?::timestamptz ` +
			`where "id" = ? and exists (select 1 from "ins")`,
		[
			...recordValues(record, c),
			...(u ? [u.action, u.subjectType, u.subjectId, JSON.stringify(u.detail)] : []),
			record.hash,
			record.seq,
			c.serverTime.toISOString(),
			run.id
		],
		'run'
	);
	return result.affectedRows === 1;
}

/** The run's row as the appender last saw it: the fast append goes ahead only if the row is still exactly so. */
export interface ExpectedHead {
	headHash: string | null;
	recordCount: number;
	state: string;
	reworkSteps: number[] | null;
}

/** A SQL literal of one bound value (strings quoted as pg's `escapeLiteral` does; numbers finite). */
function literal(v: unknown): string {
	if (v === null || v === undefined) return 'null';
	if (typeof v === 'boolean') return v ? 'true' : 'false';
	if (typeof v === 'number' && Number.isFinite(v)) return String(v);
	if (typeof v !== 'string') throw new Error(`Cannot write a ${typeof v} into the append statement.`);
	const quoted = `'${v.replace(/'/g, "''")}'`;
	return v.includes('\\') ? ` E${quoted.replace(/\\/g, '\\\\')}` : quoted;
}

/** `sql` with each `?` replaced by the literal of the next value (the statement text has no other `?`). */
function inline(sql: string, values: unknown[]): string {
	let i = 0;
	const out = sql.replace(/\?/g, () => literal(values[i++]));
	if (i !== values.length) throw new Error(`The append statement has ${i} placeholders for ${values.length} values.`);
	return out;
}

/**
 * The fast append's statement text, placeholders for: the run (lock), the record, the expected head, the
 * unless-logged entry, the tablet that must not be revoked, the new head.
 */
const FAST_APPEND =
	`select 1 from "run" where "id" = ? for update;\n` +
	`with "ins" as (insert into "ledger_record" (${RECORD_COLUMNS}) select ${RECORD_PLACEHOLDERS} ` +
	`where exists (select 1 from "run" where "id" = ? and "head_hash" is not distinct from ? and "record_count" = ? ` +
	`and "state" = ? and "rework_steps" is not distinct from ?::jsonb) ` +
	`and not exists (select 1 from "admin_log" where "action" = ? and "subject_type" = ? and "subject_id" = ? and ` +
	`"detail" @> ?::jsonb) ` +
	`and not exists (select 1 from "device" where "id" = ?::uuid and "revoked_at" is not null) returning "id") ` +
	`update "run" set "head_hash" = ?, "record_count" = ?, "updated_at" = ?::timestamptz ` +
	`where "id" = ? and exists (select 1 from "ins")`;

/**
 * One append in ONE round trip and its own transaction: a two-statement simple query, which PostgreSQL runs as one
 * implicit transaction (rolled back whole on any error). The first statement takes the run's row lock
 * (`SELECT … FOR UPDATE`); the second — with its own snapshot, taken once the lock is held — inserts the record and
 * advances the head only if the run's row is still `expect` (same head, count, state and rework steps: the record's
 * `prevHash`/`seq` were chained on it), no `unlessLogged` entry exists and the enrolled tablet `activeDevice` (the
 * one whose signature was verified; null for none) has not been revoked by then. Returns whether it stored the record;
 * false (or a thrown database error) means nothing was stored and the caller takes the full path.
 *
 * The hot path of the submit route: the text goes straight to a pooled `pg` client (no query builder, no ORM
 * formatter), values written as literals by {@link literal} — a simple Query message cannot carry bindings, and
 * only a simple query runs both statements in one implicit transaction.
 */
export async function lockAndAppendIfHead(
	em: EntityManager,
	record: SealedRecord,
	c: RecordColumns,
	expect: ExpectedHead,
	guard: { unlessLogged: UnlessLogged; activeDevice: string | null }
): Promise<boolean> {
	const { unlessLogged } = guard;
	const text = inline(FAST_APPEND, [
		record.runId,
		...recordValues(record, c),
		record.runId,
		expect.headHash,
		expect.recordCount,
		expect.state,
		expect.reworkSteps === null ? null : JSON.stringify(expect.reworkSteps),
		unlessLogged.action,
		unlessLogged.subjectType,
		unlessLogged.subjectId,
		JSON.stringify(unlessLogged.detail),
		guard.activeDevice,
		record.hash,
		record.seq,
		c.serverTime.toISOString(),
		record.runId
	]);
	return withPooledClient(em, async (client) => {
		// A multi-statement simple query answers with one result per statement.
		const results = (await client.query(text)) as unknown as { rowCount: number | null }[];
		return Array.isArray(results) && results.length === 2 && results[1].rowCount === 1;
	});
}
