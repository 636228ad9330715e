import { describe, expect, it } from 'vitest';
import { appendTo } from '../ledger/chain';
import { canonicalRecord, recordHash, type LedgerRecord } from '../ledger/record';
import { sealNext, serverRecordHash, sha256Hex, storedTextHash } from './ledger-hash';

/** Invented demo data (Kestrel Lane Transmission Works, KTX-7): ASCII, accents, an astral character, escapes. */
const records: LedgerRecord[] = [
	{
		id: '0193a5f0-1c2d-7abc-8def-0123456789ab',
		runId: '4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a',
		seq: 1,
		kind: 'attempt',
		body: { stepIndex: 0, entries: [{ checkpointId: 'bore-1', entry: { readings: ['22.010'] } }] },
		prevHash: null
	},
	{
		id: '0193a5f0-1c2d-7abc-8def-0123456789ac',
		runId: '4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a',
		seq: 2,
		kind: 'finding',
		body: { text: 'Rayure légère — bore C1 \u{1F527} "quoted" \\ back\nslash\ttab \u2028', n: [1.5, -0, 1e21] },
		prevHash: 'a'.repeat(64)
	}
];

describe('serverRecordHash', () => {
	it('hashes "abc" as FIPS 180-2 Appendix B.1 gives it', () => {
		expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
	});

	it.each(records.map((r) => [r.kind, r] as const))('equals the pure recordHash (%s)', (_, r) => {
		expect(serverRecordHash(r)).toBe(recordHash(r));
	});

	it('gives appendTo the same stored record as the default hash', () => {
		const draft = { id: records[1].id, runId: records[1].runId, kind: records[1].kind, body: records[1].body };
		const head = { runId: records[1].runId, seq: 1, hash: 'b'.repeat(64) };
		expect(appendTo(head, draft, serverRecordHash)).toEqual(appendTo(head, draft));
	});
});

describe('sealNext', () => {
	it('seals the record appendTo makes, with the canonical text its hash is over', () => {
		const draft = { id: records[1].id, runId: records[1].runId, kind: records[1].kind, body: records[1].body };
		const head = { runId: records[1].runId, seq: 1, hash: 'a'.repeat(64) };
		const sealed = sealNext(head, draft);
		const { canonical, ...stored } = sealed;
		expect(stored).toEqual(appendTo(head, draft));
		expect(canonical).toBe(canonicalRecord(records[1]));
	});
});

describe('storedTextHash', () => {
	const sealed = records.map((r) => sealNext(r.seq === 1 ? null : { runId: r.runId, seq: 1, hash: r.prevHash! }, r));

	it.each(sealed.map((r) => [r.kind, r] as const))(
		'gives the stored hash from the text (%s), bytes or string',
		(_, r) => {
			expect(storedTextHash(r)).toBe(recordHash(r));
			expect(storedTextHash({ ...r, canonical: new TextEncoder().encode(r.canonical) })).toBe(recordHash(r));
		}
	);

	it('gives a different hash when one byte of the body changed', () => {
		const r = sealed[0];
		const altered = r.canonical.replace('22.010', '22.019');
		expect(storedTextHash({ ...r, canonical: altered })).not.toBe(r.hash);
	});

	// The row's columns are what the chain is checked on: a text that is not their envelope is an altered row.
	it.each([
		['id', { id: '0193a5f0-1c2d-7abc-8def-0123456789ff' }],
		['kind', { kind: 'signoff' as const }],
		['seq', { seq: 3 }],
		['prevHash', { prevHash: 'c'.repeat(64) }],
		['prevHash (null)', { prevHash: null }],
		['runId', { runId: '00000000-0000-4000-8000-000000000000' }]
	])('refuses a text that is not the envelope of the row (%s differs)', (_, change) => {
		const r = sealed[1];
		expect(() => storedTextHash({ ...r, ...change })).toThrow(/not its envelope/);
	});

	it('refuses a text that does not begin with the body', () => {
		const r = sealed[0];
		expect(() => storedTextHash({ ...r, canonical: '{"bodx":' + r.canonical.slice(8) })).toThrow(/not its envelope/);
	});

	// Fields outside [0-9a-z_-] take the string path (the fast one writes them unescaped); both must agree.
	it('checks the envelope of fields that need JSON escaping the same way', () => {
		const odd = { ...sealed[1], kind: 'sign"off' as 'signoff', id: 'ID-Upper' };
		const text = canonicalRecord(odd);
		expect(storedTextHash({ ...odd, canonical: text })).toBe(recordHash(odd));
		expect(() => storedTextHash({ ...odd, kind: 'signoff', canonical: text })).toThrow(/not its envelope/);
	});

	it('hashes a text longer than its reused buffer', () => {
		const big = sealNext(null, { ...sealed[0], body: { text: 'x'.repeat(100_000) } });
		expect(storedTextHash(big)).toBe(recordHash(big));
		expect(storedTextHash(sealed[0])).toBe(recordHash(sealed[0]));
	});
});
