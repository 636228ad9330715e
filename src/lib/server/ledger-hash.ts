/**
 * The ledger's sha256s on the server, through node:crypto's one-shot `hash` (native) instead of the pure-JS sha256
 * the browser and `$lib/ledger` use. Same preimage, same bytes, same hex: `ledger-hash.test.ts` holds
 * {@link serverRecordHash} equal to `recordHash`. Pass it to `appendTo` as its `hash`.
 */
import { hash } from 'node:crypto';
import { canonicalRecord, LEDGER_HASH_DOMAIN, type LedgerRecord } from '../ledger/record';

/** sha256 (lower-case hex) of the UTF-8 of `text`. */
export const sha256Hex = (text: string): string => hash('sha256', text, 'hex');

/**
 * `recordHash(r)` computed natively. UTF-8 of a string is the same from node:crypto as from TextEncoder because the
 * canonical form never holds a lone surrogate (`canonicalize` refuses them).
 */
export const serverRecordHash = (r: LedgerRecord): string => sha256Hex(LEDGER_HASH_DOMAIN + canonicalRecord(r));
