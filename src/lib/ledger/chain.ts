/**
 * One hash chain per run: record n stores the hash of record n − 1. Appending (done by the server under the run's
 * row lock) and verifying (done by the quality lead's *verify*, after a restore, and in the benchmark).
 *
 * A chain that verifies by itself proves only that it is consistent: someone with database access could alter a
 * record and recompute every later hash. {@link verifyAgainstAnchor} closes that gap with a head kept outside the
 * database (printed on a release PDF, sent in the daily digest).
 */
import { type ChainLink, type LedgerRecord, type RecordDraft, recordHash, type StoredRecord } from './record';

/** The last record of a run's chain, which is all an append needs. */
export interface ChainHead {
	runId: string;
	seq: number;
	hash: string;
}

/** The head of the chain that ends with `r`. */
export function headOf(r: StoredRecord): ChainHead {
	return { runId: r.runId, seq: r.seq, hash: r.hash };
}

/**
 * The envelope of `draft` appended after `head` (null: the run has no records yet, so this is the first, with seq 1
 * and prevHash null), not yet hashed. Pure: the caller reads the head and inserts the result inside one transaction
 * that holds the run's row lock, so two submissions can never both follow the same head.
 *
 * @throws {Error} when `head` belongs to another run.
 */
export function nextRecord(head: ChainHead | null, draft: RecordDraft): LedgerRecord {
	if (head && head.runId !== draft.runId) {
		throw new Error(`Record ${draft.id} is for run ${draft.runId} but the chain head is of run ${head.runId}.`);
	}
	return {
		id: draft.id,
		runId: draft.runId,
		seq: head ? head.seq + 1 : 1,
		kind: draft.kind,
		body: draft.body,
		prevHash: head ? head.hash : null
	};
}

/**
 * The stored form of `draft` appended after `head`: {@link nextRecord} with its hash. `hash` is {@link recordHash}
 * unless the caller passes an equal one (the server seals records with node:crypto's sha256 over the same preimage,
 * `$lib/server/ledger-hash`; a unit test holds them equal).
 *
 * @throws {Error} when `head` belongs to another run; {@link JcsError} when the body is not plain JSON.
 */
export function appendTo(
	head: ChainHead | null,
	draft: RecordDraft,
	hash: (r: LedgerRecord) => string = recordHash
): StoredRecord {
	const record = nextRecord(head, draft);
	return { ...record, hash: hash(record) };
}

/** Why a chain does not verify. */
export type ChainFailureReason =
	/** The record's contents no longer give its stored hash: it was edited after signing. */
	| 'hash_mismatch'
	/** The record's previous-hash is not the hash of the record before it. */
	| 'broken_link'
	/** A number is missing (a record was deleted) or the numbering is wrong. */
	| 'sequence_gap'
	/** The expected record is present but later in the list. */
	| 'out_of_order'
	/** The same record id appears twice. */
	| 'duplicate_id'
	/** Two records follow the same predecessor. */
	| 'fork'
	/** A record of another run is in the list. */
	| 'wrong_run'
	/** The chain's head at the anchor's count is not the anchored head (alter-and-rehash). */
	| 'anchor_mismatch'
	/** The chain is shorter than it was when the anchor was taken. */
	| 'anchor_missing_records'
	/** An anchor's count is no count a chain can have: the anchor itself was written outside the app. */
	| 'anchor_invalid';

/** The chain is intact: `head` is the last record's hash (null for an empty chain), `count` its length. */
export interface ChainIntact {
	ok: true;
	head: string | null;
	count: number;
}

/** The first record that does not match, and why, in words a quality lead can act on. */
export interface ChainFailure {
	ok: false;
	/** 0-based position in the list passed in. */
	index: number;
	/** Id of the record at `index`, or null when it is missing. */
	recordId: string | null;
	reason: ChainFailureReason;
	expected: string;
	found: string;
	message: string;
}

/** Result of {@link verifyChain} and {@link verifyAgainstAnchor}. */
export type ChainVerification = ChainIntact | ChainFailure;

/** A chain head kept outside the database: "after `count` records the head was `head`", recorded `at`. */
export interface ChainAnchor {
	head: string;
	count: number;
	/** When and where it was recorded, as shown to people, e.g. an ISO time or "release PDF of 2026-12-01". */
	at: string;
}

function fail(
	index: number,
	recordId: string | null,
	reason: ChainFailureReason,
	expected: string,
	found: string,
	message: string
): ChainFailure {
	return { ok: false, index, recordId, reason, expected, found, message };
}

function safeHash<T>(r: T, hash: (r: T) => string): string | null {
	try {
		return hash(r);
	} catch {
		return null; // a body that can no longer be encoded cannot be the one that was signed
	}
}

/** How a failure names a record; built only for a failure (verify runs the loop a million times). */
const named = (r: ChainLink) => `Record ${r.seq} (${r.kind}, id ${r.id})`;

const short = (hash: string | null) => (hash === null ? 'none' : hash.slice(0, 12) + '…');

/**
 * Recompute a run's chain and report intact, or the FIRST record that does not match and why.
 *
 * `records` are one run's records in stored order (`ORDER BY seq`). Per record, in this order: duplicate id, other
 * run, hash, fork, numbering, link — so an edited record is reported as edited, not as the break it causes.
 * Deleting the last records cannot be seen from the chain alone; {@link verifyAgainstAnchor} sees it.
 *
 * `hash` is {@link recordHash} unless the caller passes an equal one (the server passes node:crypto's, as to
 * {@link appendTo}).
 */
export function verifyChain(records: readonly StoredRecord[]): ChainVerification;
export function verifyChain<T extends ChainLink>(records: readonly T[], hash: (r: T) => string): ChainVerification;
export function verifyChain(
	records: readonly ChainLink[],
	hash: (r: ChainLink) => string = recordHash as unknown as (r: ChainLink) => string
): ChainVerification {
	const ids = new Map<string, number>();
	const followers = new Map<string | null, number>();
	for (let i = 0; i < records.length; i++) {
		const r = records[i];

		const twin = ids.get(r.id);
		if (twin !== undefined) {
			return fail(
				i,
				r.id,
				'duplicate_id',
				'a new id',
				r.id,
				`${named(r)} has the same id as the record at position ${twin + 1}: one submission was stored twice.`
			);
		}
		ids.set(r.id, i);

		if (r.runId !== records[0].runId) {
			return fail(
				i,
				r.id,
				'wrong_run',
				records[0].runId,
				r.runId,
				`${named(r)} belongs to run ${r.runId}, not to run ${records[0].runId}: it does not belong in this chain.`
			);
		}

		const computed = safeHash(r, hash);
		if (computed !== r.hash) {
			return fail(
				i,
				r.id,
				'hash_mismatch',
				r.hash,
				computed ?? 'unencodable contents',
				`${named(r)} was changed after it was stored: its contents no longer give the hash recorded with it.`
			);
		}

		const sibling = followers.get(r.prevHash);
		if (sibling !== undefined) {
			return fail(
				i,
				r.id,
				'fork',
				'one record after each record',
				`records ${records[sibling].seq} and ${r.seq} follow the same record`,
				`${named(r)} and record ${records[sibling].seq} (id ${records[sibling].id}) both follow the same earlier record: the chain splits in two here, as when two submissions are appended at once without the run's lock.`
			);
		}
		followers.set(r.prevHash, i);

		const prev = i > 0 ? records[i - 1] : null;
		const expectedSeq = prev ? prev.seq + 1 : 1;
		if (r.seq !== expectedSeq) {
			const later = records.findIndex((x, j) => j > i && x.seq === expectedSeq);
			if (later >= 0) {
				return fail(
					i,
					r.id,
					'out_of_order',
					String(expectedSeq),
					String(r.seq),
					`${named(r)} is stored where record ${expectedSeq} belongs; record ${expectedSeq} comes later in the list. The records are out of order.`
				);
			}
			const gap =
				r.seq > expectedSeq
					? `record${r.seq - expectedSeq > 1 ? `s ${expectedSeq}–${r.seq - 1} are` : ` ${expectedSeq} is`} missing — deleted from the ledger.`
					: `the numbering is wrong.`;
			const after = prev ? `After record ${prev.seq} comes record ${r.seq}` : `The chain starts at record ${r.seq}`;
			return fail(i, r.id, 'sequence_gap', String(expectedSeq), String(r.seq), `${after}: ${gap}`);
		}

		const expectedPrev = prev ? prev.hash : null;
		if (r.prevHash !== expectedPrev) {
			const message = prev
				? `${named(r)} does not follow record ${prev.seq}: it names ${short(r.prevHash)} as the record before it, but record ${prev.seq}'s hash is ${short(prev.hash)}. A record between them was removed or replaced.`
				: `${named(r)} is the first record but points to an earlier one that is not there: the start of the chain is missing.`;
			return fail(i, r.id, 'broken_link', expectedPrev ?? 'none', r.prevHash ?? 'none', message);
		}
	}
	const last = records.at(-1);
	return { ok: true, head: last ? last.hash : null, count: records.length };
}

/**
 * {@link verifyChain}, then compare the chain with an anchor kept outside the database. A chain that verifies by
 * itself but whose head after `anchor.count` records is not `anchor.head` was altered and every later hash
 * recomputed — an alter-and-rehash, which only an outside copy can reveal.
 */
export function verifyAgainstAnchor(records: readonly StoredRecord[], anchor: ChainAnchor): ChainVerification {
	return verifyAgainstAnchors(records, [anchor]);
}

/**
 * {@link verifyAgainstAnchor} for several anchors (e.g. every release PDF and digest of a run); the failure of the
 * earliest anchor that does not match is reported. `hash` as for {@link verifyChain}.
 */
export function verifyAgainstAnchors(
	records: readonly StoredRecord[],
	anchors: readonly ChainAnchor[]
): ChainVerification;
export function verifyAgainstAnchors<T extends ChainLink>(
	records: readonly T[],
	anchors: readonly ChainAnchor[],
	hash: (r: T) => string
): ChainVerification;
export function verifyAgainstAnchors(
	records: readonly ChainLink[],
	anchors: readonly ChainAnchor[],
	hash: (r: ChainLink) => string = recordHash as unknown as (r: ChainLink) => string
): ChainVerification {
	const chain = verifyChain(records, hash);
	if (!chain.ok) return chain;
	for (const anchor of [...anchors].sort((a, b) => a.count - b.count)) {
		if (!Number.isInteger(anchor.count) || anchor.count < 1) {
			return fail(
				0,
				null,
				'anchor_invalid',
				'a count of 1 or more',
				String(anchor.count),
				`The anchor of ${anchor.at} says the chain had ${anchor.count} records, which no chain can have: the app never writes such an anchor, so it was written directly into the database — investigate the anchors and the ledger.`
			);
		}
		const index = anchor.count - 1;
		if (records.length < anchor.count) {
			return fail(
				index,
				null,
				'anchor_missing_records',
				String(anchor.count),
				String(records.length),
				`The chain has ${records.length} records, but on ${anchor.at} it already had ${anchor.count}: records were deleted from its end.`
			);
		}
		const r = records[index];
		if (r.hash !== anchor.head) {
			return fail(
				index,
				r.id,
				'anchor_mismatch',
				anchor.head,
				r.hash,
				`The chain checks out by itself, but after ${anchor.count} records its head is ${short(r.hash)} where ${anchor.at} recorded ${short(anchor.head)}: a record at or before record ${r.seq} was altered and every later hash recomputed to hide it (alter-and-rehash).`
			);
		}
	}
	return chain;
}
