import { sha256 } from '@noble/hashes/sha2.js';
import { bytesToHex, utf8ToBytes } from '@noble/hashes/utils.js';
import { describe, expect, it } from 'vitest';
import {
	CANONICAL_HEAD,
	canonicalRecord,
	canonicalTail,
	LEDGER_HASH_DOMAIN,
	type LedgerRecord,
	recordHash
} from './record';
import { ledgerRecordSchema, recordDraftSchema, storedRecordSchema } from './schema';

/** A sign-off in the invented demo scenario (Kestrel Lane Transmission Works, KTX-7); readings as decimal strings. */
const signoff: LedgerRecord = {
	id: '0193a5f0-1c2d-7abc-8def-0123456789ab',
	runId: '4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a',
	seq: 1,
	kind: 'signoff',
	body: {
		step: 'bore-c1',
		signer: { id: 'u-tech1', role: 'technician' },
		readings: [{ checkpoint: 'c1-bore', value: '12.712', unit: 'mm' }],
		tools: [{ id: 'T-0042', calibrationDue: '2027-03-01' }]
	},
	prevHash: null
};

describe('sha256 itself', () => {
	it('hashes "abc" as FIPS 180-2 Appendix B.1 says (from memory)', () => {
		expect(bytesToHex(sha256(utf8ToBytes('abc')))).toBe(
			'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'
		);
	});
});

describe('canonicalRecord and recordHash', () => {
	it('is the RFC 8785 text of exactly the six envelope fields, in sorted order', () => {
		expect(canonicalRecord(signoff)).toBe(
			'{"body":{"readings":[{"checkpoint":"c1-bore","unit":"mm","value":"12.712"}],' +
				'"signer":{"id":"u-tech1","role":"technician"},"step":"bore-c1",' +
				'"tools":[{"calibrationDue":"2027-03-01","id":"T-0042"}]},' +
				'"id":"0193a5f0-1c2d-7abc-8def-0123456789ab","kind":"signoff","prevHash":null,' +
				'"runId":"4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a","seq":1}'
		);
	});

	it('is sha256 of the domain prefix followed by the canonical text', () => {
		const expected = bytesToHex(sha256(utf8ToBytes('benchstamp-ledger/1\n' + canonicalRecord(signoff))));
		expect(LEDGER_HASH_DOMAIN).toBe('benchstamp-ledger/1\n');
		expect(recordHash(signoff)).toBe(expected);
		expect(recordHash(signoff)).not.toBe(bytesToHex(sha256(utf8ToBytes(canonicalRecord(signoff)))));
	});

	it('is pinned: changing the encoding would break every stored chain', () => {
		// Cross-checked outside this code: Python's hashlib.sha256 over "benchstamp-ledger/1\n" + json.dumps(record,
		// sort_keys=True, separators=(',', ':'), ensure_ascii=False) — equal to JCS for this all-ASCII record.
		expect(recordHash(signoff)).toBe('d2a6140fc5851d20bba64558b8333476ae2f7dcbe3c03b6a0a53552722f51510');
	});

	it('ignores properties outside the envelope (the stored hash, server columns)', () => {
		const stored = { ...signoff, hash: 'ab'.repeat(32), receivedAt: '2026-12-01T10:00:00Z' };
		expect(recordHash(stored)).toBe(recordHash(signoff));
	});

	it('does not depend on the key order of the body', () => {
		const body = signoff.body as Record<string, unknown>;
		const reordered = { tools: body.tools, readings: body.readings, step: body.step, signer: body.signer };
		expect(recordHash({ ...signoff, body: reordered as LedgerRecord['body'] })).toBe(recordHash(signoff));
	});

	it.each<[string, Partial<LedgerRecord>]>([
		['id', { id: '0193a5f0-1c2d-7abc-8def-0123456789ac' }],
		['runId', { runId: '4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5b' }],
		['seq', { seq: 2 }],
		['kind', { kind: 'verification' }],
		['prevHash', { prevHash: '0'.repeat(64) }],
		[
			'a reading, by one digit',
			{ body: { ...(signoff.body as object), readings: [{ checkpoint: 'c1-bore', value: '12.702', unit: 'mm' }] } }
		],
		[
			'trailing zero of a reading',
			{ body: { ...(signoff.body as object), readings: [{ checkpoint: 'c1-bore', value: '12.7120', unit: 'mm' }] } }
		]
	])('changes when %s changes', (_field, change) => {
		expect(recordHash({ ...signoff, ...change })).not.toBe(recordHash(signoff));
	});

	it('refuses a body that is not plain JSON', () => {
		expect(() => recordHash({ ...signoff, body: { at: new Date() } as never })).toThrow(/plain JSON object/);
	});
});

describe('zod schemas', () => {
	const draft = { id: signoff.id, runId: signoff.runId, kind: signoff.kind, body: signoff.body };

	it('accept a well-formed draft, envelope and stored record', () => {
		expect(recordDraftSchema.safeParse(draft).success).toBe(true);
		expect(ledgerRecordSchema.safeParse(signoff).success).toBe(true);
		expect(storedRecordSchema.safeParse({ ...signoff, hash: recordHash(signoff) }).success).toBe(true);
		expect(ledgerRecordSchema.safeParse({ ...signoff, seq: 2, prevHash: 'a'.repeat(64) }).success).toBe(true);
	});

	it.each<[string, Record<string, unknown>, RegExp]>([
		['a uuid v4 as record id', { id: '0193a5f0-1c2d-4abc-8def-0123456789ab' }, /uuid v7/],
		['an unknown kind', { kind: 'edit' }, /Unknown record kind/],
		['a lone surrogate in the body', { body: JSON.parse('{"note":"\\ud800"}') }, /lone surrogate/],
		['a NaN in the body', { body: { value: NaN } }, /.+/],
		['an extra field', { extra: 1 }, /.+/],
		['a body nested 10,000 deep', { body: JSON.parse('['.repeat(10_000) + ']'.repeat(10_000)) }, /at most 32 levels/]
	])('refuse %s', (_what, change, message) => {
		const r = recordDraftSchema.safeParse({ ...draft, ...change });
		expect(r.success).toBe(false);
		expect(r.error?.issues.map((i) => i.message).join(' ')).toMatch(message);
	});

	it('accepts a body nested exactly 32 levels', () => {
		const body = JSON.parse('['.repeat(32) + ']'.repeat(32));
		expect(recordDraftSchema.safeParse({ ...draft, body }).success).toBe(true);
	});

	it.each<[string, Record<string, unknown>, RegExp]>([
		['seq 0', { seq: 0 }, /seq 1/],
		['a fractional seq', { seq: 1.5 }, /.+/],
		['the first record with a previous hash', { prevHash: 'a'.repeat(64) }, /Only the first record/],
		['a later record without one', { seq: 3 }, /Only the first record/],
		['an upper-case hash', { seq: 2, prevHash: 'A'.repeat(64) }, /lower-case hexadecimal/],
		['a short hash', { seq: 2, prevHash: 'a'.repeat(63) }, /64 lower-case/]
	])('the envelope refuses %s', (_what, change, message) => {
		const r = ledgerRecordSchema.safeParse({ ...signoff, ...change });
		expect(r.success).toBe(false);
		expect(r.error?.issues.map((i) => i.message).join(' ')).toMatch(message);
	});
});

describe('CANONICAL_HEAD and canonicalTail', () => {
	// What verify checks a stored text against: the text is head + JCS(body) + tail, nothing else.
	it.each([
		['the first record (no previous hash)', signoff],
		['a later record', { ...signoff, seq: 12, kind: 'finding' as const, prevHash: 'f'.repeat(64) }]
	])('frame the canonical text of %s around its body', (_, r) => {
		const text = canonicalRecord(r);
		const body = JSON.stringify(JSON.parse(text).body);
		expect(text.startsWith(CANONICAL_HEAD)).toBe(true);
		expect(text.endsWith(canonicalTail(r))).toBe(true);
		expect(JSON.parse(CANONICAL_HEAD + body + canonicalTail(r))).toEqual(JSON.parse(text));
	});
});
