import { describe, expect, it } from 'vitest';
import { appendTo, headOf, verifyAgainstAnchors, verifyChain } from '../ledger/chain';
import { recordHash, type StoredRecord } from '../ledger/record';
import { serverRecordHash } from './ledger-hash';

const RUN = '4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a';

/** Four bore readings of the invented KTX-7 demo, chained as the server appends them. */
function chain(): StoredRecord[] {
	const out: StoredRecord[] = [];
	for (let n = 1; n <= 4; n++)
		out.push(
			appendTo(out.length ? headOf(out.at(-1)!) : null, {
				id: `0193a5f0-1c2d-7abc-8def-00000000000${n}`,
				runId: RUN,
				kind: 'attempt',
				body: { stepIndex: 0, entries: [{ checkpointId: 'bore-1', entry: { readings: [`22.01${n}`] } }] }
			})
		);
	return out;
}

describe('verifyChain with the server hash (audit verify)', () => {
	it('gives the same answer as the pure default on an intact chain', () => {
		expect(verifyChain(chain(), serverRecordHash)).toEqual(verifyChain(chain()));
		expect(verifyChain(chain(), serverRecordHash)).toMatchObject({ ok: true, count: 4 });
	});

	it('reports an edited record at exactly that record, as the default does', () => {
		const edited = chain();
		edited[2] = {
			...edited[2],
			body: { stepIndex: 0, entries: [{ checkpointId: 'bore-1', entry: { readings: ['22.030'] } }] }
		};
		const server = verifyChain(edited, serverRecordHash);
		expect(server).toEqual(verifyChain(edited));
		expect(server).toMatchObject({ ok: false, index: 2, reason: 'hash_mismatch' });
	});

	it('really uses the hash it is given (a wrong one fails the first record)', () => {
		expect(verifyChain(chain(), () => '0'.repeat(64))).toMatchObject({ ok: false, index: 0, reason: 'hash_mismatch' });
		expect(recordHash(chain()[0])).toBe(chain()[0].hash);
	});

	it('passes the hash through the anchors check too', () => {
		const records = chain();
		const anchor = { head: records[3].hash, count: 4, at: 'the release PDF of 2026-12-01 10:00 UTC' };
		expect(verifyAgainstAnchors(records, [anchor], serverRecordHash)).toEqual(verifyAgainstAnchors(records, [anchor]));
		expect(verifyAgainstAnchors(records, [anchor], () => 'x')).toMatchObject({ ok: false, reason: 'hash_mismatch' });
	});
});
