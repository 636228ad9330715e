/**
 * The ledger's sha256s on the server, through node:crypto (native) instead of the pure-JS sha256 the browser and
 * `$lib/ledger` use. Same preimage, same bytes, same hex: `ledger-hash.test.ts` holds {@link serverRecordHash} equal
 * to `recordHash`.
 *
 * Records are sealed here ({@link sealNext}): the canonical text is made once, hashed, and stored as it is — the
 * `body` column is generated from it — so verify can hash the stored bytes ({@link storedTextHash}) without decoding
 * and re-encoding the body.
 */
import { hash } from 'node:crypto';
import { nextRecord, type ChainHead } from '../ledger/chain';
import {
	CANONICAL_HEAD,
	canonicalRecord,
	canonicalTail,
	LEDGER_HASH_DOMAIN,
	type ChainLink,
	type LedgerRecord,
	type RecordDraft,
	type SealedRecord
} from '../ledger/record';

/** sha256 (lower-case hex) of the UTF-8 of `text`. */
export const sha256Hex = (text: string): string => hash('sha256', text, 'hex');

/**
 * `recordHash(r)` computed natively. UTF-8 of a string is the same from node:crypto as from TextEncoder because the
 * canonical form never holds a lone surrogate (`canonicalize` refuses them).
 */
export const serverRecordHash = (r: LedgerRecord): string => sha256Hex(LEDGER_HASH_DOMAIN + canonicalRecord(r));

/**
 * `draft` appended after `head` (`nextRecord`), with its canonical text and the hash of it: what the ledger stores.
 *
 * @throws {Error} when `head` belongs to another run; {@link JcsError} when the body is not plain JSON.
 */
export function sealNext(head: ChainHead | null, draft: RecordDraft): SealedRecord {
	const record = nextRecord(head, draft);
	const canonical = canonicalRecord(record);
	return { ...record, canonical, hash: sha256Hex(LEDGER_HASH_DOMAIN + canonical) };
}

/** A stored row as verify reads it: the envelope's columns and the stored canonical text (UTF-8 bytes or a string). */
export interface StoredText extends ChainLink {
	canonical: Uint8Array | string;
}

const DOMAIN = Buffer.from(LEDGER_HASH_DOMAIN, 'utf8');
const HEAD = Buffer.from(CANONICAL_HEAD, 'latin1');

// Reused between calls (verify is synchronous per record and runs a million times): the preimage is built here so
// one-shot `hash()` can take it — three times faster than `createHash().update().update().digest()` per record,
// measured in the audit bench's CPU profile — and the expected envelope tail is written here instead of as a string.
let preimage = Buffer.alloc(64 * 1024);
DOMAIN.copy(preimage);
const tail = Buffer.alloc(512);

/** Whether `value` may stand unescaped between JSON quotes (control characters cannot: the text is valid JSON). */
const plain = (value: string) => value.indexOf('"') === -1 && value.indexOf('\\') === -1;

/**
 * {@link canonicalTail}`(r)` written into `tail` with the fields unescaped, its length; -1 when a field holds a quote,
 * a backslash or a non-ASCII character (there the unescaped form would differ, and the caller compares against
 * `canonicalTail` itself). One string and one write: per-field writes and a regex were as slow as the hash.
 */
function writeTail(r: ChainLink): number {
	const prev = r.prevHash === null ? 'null' : `"${r.prevHash}"`;
	const text = `,"id":"${r.id}","kind":"${r.kind}","prevHash":${prev},"runId":"${r.runId}","seq":${r.seq}}`;
	if (text.length > tail.length) return -1;
	const n = tail.write(text, 0, 'utf8');
	if (n !== text.length) return -1;
	if (!plain(r.id) || !plain(r.kind) || !plain(r.runId) || (r.prevHash !== null && !plain(r.prevHash))) return -1;
	return n;
}

/** Whether `text` is the envelope of exactly `r`'s id, run, seq, kind and previous hash around some body. */
function envelopeMatches(text: Buffer, r: ChainLink): boolean {
	if (text.length <= HEAD.length || text.compare(HEAD, 0, HEAD.length, 0, HEAD.length) !== 0) return false;
	const n = writeTail(r);
	if (n < 0) {
		const expected = Buffer.from(canonicalTail(r), 'utf8');
		return (
			text.length > HEAD.length + expected.length &&
			text.compare(expected, 0, expected.length, text.length - expected.length) === 0
		);
	}
	return text.length > HEAD.length + n && text.compare(tail, 0, n, text.length - n) === 0;
}

/**
 * The hash of a stored record recomputed from its stored canonical text, for `verifyChain`. The text must be the
 * envelope of the row's own id, run, seq, kind and previous hash (the columns the chain is checked on), else the row
 * was altered around its text and this throws — `verifyChain` reports the record as changed.
 */
export function storedTextHash(r: StoredText): string {
	const text =
		typeof r.canonical === 'string'
			? Buffer.from(r.canonical, 'utf8')
			: Buffer.isBuffer(r.canonical)
				? r.canonical
				: Buffer.from(r.canonical.buffer, r.canonical.byteOffset, r.canonical.byteLength);
	if (!envelopeMatches(text, r)) throw new Error(`The stored text of record ${r.id} is not its envelope.`);
	const size = DOMAIN.length + text.length;
	if (size > preimage.length) {
		preimage = Buffer.alloc(Math.max(size, preimage.length * 2));
		DOMAIN.copy(preimage);
	}
	text.copy(preimage, DOMAIN.length);
	return hash('sha256', preimage.subarray(0, size), 'hex');
}
