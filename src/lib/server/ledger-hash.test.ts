import { describe, expect, it } from 'vitest';
import { appendTo } from '../ledger/chain';
import { recordHash, type LedgerRecord } from '../ledger/record';
import { serverRecordHash, sha256Hex } from './ledger-hash';

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
