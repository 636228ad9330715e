import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { appendTo, type ChainFailure, headOf, verifyAgainstAnchor, verifyAgainstAnchors, verifyChain } from './chain';
import { type JsonValue } from './jcs';
import { type RecordDraft, recordHash, type StoredRecord } from './record';
import { createUuidV7 } from './uuid-v7';

const RUN = '4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a';
const OTHER_RUN = '9c1d2e3f-4a5b-4c6d-8e7f-0a1b2c3d4e5f';

/** Deterministic ids so failures are reproducible; one clock for the file so no two tests make the same id. */
let clock = 1_764_590_000_000;
const sharedIds = createUuidV7({ now: () => clock++, random: (b) => b.fill(7) });
const idMaker = () => sharedIds;

/** A draft sign-off in the invented KTX-7 demo scenario, reading as a decimal string. */
function draft(newId: () => string, n: number, runId = RUN): RecordDraft {
	return {
		id: newId(),
		runId,
		kind: 'signoff',
		body: { step: `step-${n}`, readings: [{ checkpoint: `c${n}`, value: `12.71${n}`, unit: 'mm' }] }
	};
}

/** A chain of `length` records appended one after the other, as the server does under the run's lock. */
function chainOf(length: number): StoredRecord[] {
	const newId = idMaker();
	const records: StoredRecord[] = [];
	for (let n = 1; n <= length; n++)
		records.push(appendTo(records.length ? headOf(records.at(-1)!) : null, draft(newId, n)));
	return records;
}

/** Rewrite the reading of records[index] and, when `rehash`, recompute its hash and every later link and hash. */
function alter(records: StoredRecord[], index: number, rehash: 'none' | 'self' | 'all'): StoredRecord[] {
	const out = records.map((r) => ({ ...r }));
	out[index].body = {
		...(out[index].body as Record<string, JsonValue>),
		readings: [{ checkpoint: 'c', value: '12.690', unit: 'mm' }]
	};
	if (rehash === 'none') return out;
	out[index].hash = recordHash(out[index]);
	if (rehash === 'self') return out;
	for (let i = index + 1; i < out.length; i++) {
		out[i].prevHash = out[i - 1].hash;
		out[i].hash = recordHash(out[i]);
	}
	return out;
}

function failure(r: ReturnType<typeof verifyChain>): ChainFailure {
	if (r.ok) throw new Error('expected the chain to fail verification');
	return r;
}

describe('appendTo', () => {
	it('starts a run at seq 1 with no previous hash, then links each record to the one before', () => {
		const [a, b, c] = chainOf(3);
		expect([a.seq, a.prevHash]).toEqual([1, null]);
		expect([b.seq, b.prevHash]).toEqual([2, a.hash]);
		expect([c.seq, c.prevHash]).toEqual([3, b.hash]);
		expect(c.hash).toBe(recordHash(c));
	});

	it("refuses a head of another run's chain", () => {
		const [a] = chainOf(1);
		expect(() => appendTo(headOf(a), draft(idMaker(), 2, OTHER_RUN))).toThrow(/chain head is of run/);
	});
});

describe('verifyChain', () => {
	const chain = chainOf(6);

	it('reports an intact chain with its head and count', () => {
		expect(verifyChain(chain)).toEqual({ ok: true, head: chain[5].hash, count: 6 });
	});

	it('reports an empty chain as intact with no head', () => {
		expect(verifyChain([])).toEqual({ ok: true, head: null, count: 0 });
	});

	it('a flipped reading in record index 3 → hash_mismatch at index 3', () => {
		const f = failure(verifyChain(alter(chain, 3, 'none')));
		expect([f.index, f.recordId, f.reason]).toEqual([3, chain[3].id, 'hash_mismatch']);
		expect(f.expected).toBe(chain[3].hash);
		expect(f.message).toMatch(/^Record 4 \(signoff, id .+\) was changed after it was stored/);
	});

	it('a record altered and re-hashed on its own → broken_link at the next one', () => {
		const f = failure(verifyChain(alter(chain, 3, 'self')));
		expect([f.index, f.reason]).toEqual([4, 'broken_link']);
		expect(f.expected).not.toBe(f.found);
		expect(f.message).toMatch(/does not follow record 4/);
	});

	it('a deleted record → sequence_gap where it was', () => {
		const f = failure(verifyChain(chain.filter((_, i) => i !== 2)));
		expect([f.index, f.recordId, f.reason, f.expected, f.found]).toEqual([2, chain[3].id, 'sequence_gap', '3', '4']);
		expect(f.message).toBe('After record 2 comes record 4: record 3 is missing — deleted from the ledger.');
	});

	it('two deleted records are named as a range', () => {
		const f = failure(verifyChain([chain[0], chain[3], chain[4]]));
		expect(f.message).toMatch(/records 2–3 are missing/);
	});

	it('a deleted first record → sequence_gap at index 0', () => {
		const f = failure(verifyChain(chain.slice(1)));
		expect([f.index, f.reason]).toEqual([0, 'sequence_gap']);
		expect(f.message).toMatch(/^The chain starts at record 2/);
	});

	it('a deleted record with the later ones renumbered (not re-hashed) → hash_mismatch', () => {
		const renumbered = chain.filter((_, i) => i !== 2).map((r, i) => ({ ...r, seq: i + 1 }));
		expect(failure(verifyChain(renumbered))).toMatchObject({ index: 2, reason: 'hash_mismatch' });
	});

	it('a reordered pair → out_of_order at the first of them', () => {
		const swapped = [...chain];
		[swapped[2], swapped[3]] = [swapped[3], swapped[2]];
		const f = failure(verifyChain(swapped));
		expect([f.index, f.reason, f.expected, f.found]).toEqual([2, 'out_of_order', '3', '4']);
	});

	it('a fork: two records appended to the same head → fork at the second', () => {
		const newId = idMaker();
		const base = chainOf(3);
		const a = appendTo(headOf(base[2]), draft(newId, 40));
		const b = appendTo(headOf(base[2]), draft(newId, 41));
		const f = failure(verifyChain([...base, a, b]));
		expect([f.index, f.recordId, f.reason]).toEqual([4, b.id, 'fork']);
		expect(f.message).toMatch(/both follow the same earlier record/);
	});

	it('two first records → fork', () => {
		const newId = idMaker();
		const f = failure(verifyChain([appendTo(null, draft(newId, 1)), appendTo(null, draft(newId, 2))]));
		expect([f.index, f.reason]).toEqual([1, 'fork']);
	});

	it('the same submission stored twice → duplicate_id', () => {
		const d = draft(idMaker(), 1);
		const first = appendTo(null, d);
		const again = appendTo(headOf(first), d);
		const f = failure(verifyChain([first, again]));
		expect([f.index, f.reason, f.found]).toEqual([1, 'duplicate_id', d.id]);
	});

	it("another run's record in the list → wrong_run", () => {
		const foreign = appendTo({ ...headOf(chain[1]), runId: OTHER_RUN }, draft(idMaker(), 9, OTHER_RUN));
		const f = failure(verifyChain([chain[0], chain[1], foreign]));
		expect([f.index, f.reason]).toEqual([2, 'wrong_run']);
	});

	it('a first record that points to a missing predecessor → broken_link at index 0', () => {
		const orphan = { ...chain[0], prevHash: 'f'.repeat(64) };
		const f = failure(verifyChain([{ ...orphan, hash: recordHash(orphan) }]));
		expect([f.index, f.reason]).toEqual([0, 'broken_link']);
		expect(f.message).toMatch(/start of the chain is missing/);
	});

	it('an alter-and-rehash verifies by itself (only an anchor can catch it)', () => {
		expect(verifyChain(alter(chain, 1, 'all')).ok).toBe(true);
	});

	it('property: editing any one record is reported at exactly that record', () => {
		fc.assert(
			fc.property(
				fc.integer({ min: 1, max: 12 }).chain((n) => fc.tuple(fc.constant(n), fc.nat(n - 1))),
				([n, k]) => {
					const f = failure(verifyChain(alter(chainOf(n), k, 'none')));
					expect([f.index, f.reason]).toEqual([k, 'hash_mismatch']);
				}
			),
			{ numRuns: 100 }
		);
	});
});

describe('verifyAgainstAnchor', () => {
	const chain = chainOf(6);
	const printed = { head: chain[5].hash, count: 6, at: 'the release PDF of 2026-12-01' };

	it('an untouched chain matches its anchor', () => {
		expect(verifyAgainstAnchor(chain, printed)).toEqual({ ok: true, head: chain[5].hash, count: 6 });
	});

	it('records added after the anchor was taken still match it', () => {
		const more = [...chain, appendTo(headOf(chain[5]), draft(idMaker(), 99))];
		expect(verifyAgainstAnchor(more, printed).ok).toBe(true);
	});

	it('catches an alter-and-rehash that verifyChain cannot see', () => {
		const forged = alter(chain, 1, 'all');
		const f = failure(verifyAgainstAnchor(forged, printed));
		expect([f.index, f.recordId, f.reason, f.expected, f.found]).toEqual([
			5,
			chain[5].id,
			'anchor_mismatch',
			chain[5].hash,
			forged[5].hash
		]);
		expect(f.message).toMatch(/checks out by itself.*the release PDF of 2026-12-01.*alter-and-rehash/);
	});

	it('an anchor taken before the altered record does not cover it', () => {
		const early = { head: chain[0].hash, count: 1, at: 'the digest of 2026-11-30' };
		expect(verifyAgainstAnchor(alter(chain, 1, 'all'), early).ok).toBe(true);
	});

	it('records deleted from the end → anchor_missing_records', () => {
		const f = failure(verifyAgainstAnchor(chain.slice(0, 4), printed));
		expect([f.index, f.recordId, f.reason, f.expected, f.found]).toEqual([5, null, 'anchor_missing_records', '6', '4']);
		expect(f.message).toMatch(/has 4 records, but on the release PDF of 2026-12-01 it already had 6/);
	});

	it('a chain broken by itself is reported as such, before any anchor', () => {
		expect(failure(verifyAgainstAnchor(alter(chain, 2, 'none'), printed)).reason).toBe('hash_mismatch');
	});

	it('with several anchors reports the earliest one that does not match', () => {
		const forged = alter(chain, 3, 'all');
		const anchors = [
			printed,
			{ head: chain[4].hash, count: 5, at: 'digest 2' },
			{ head: chain[2].hash, count: 3, at: 'digest 1' }
		];
		const f = failure(verifyAgainstAnchors(forged, anchors));
		expect([f.index, f.reason]).toEqual([4, 'anchor_mismatch']);
		expect(f.message).toMatch(/digest 2/);
	});

	it('reports an anchor whose count no chain can have as a failure of that chain, not as an error', () => {
		for (const count of [0, -1, 1.5]) {
			const f = failure(verifyAgainstAnchor(chain, { head: chain[0].hash, count, at: 'digest 9' }));
			expect([f.index, f.recordId, f.reason, f.found]).toEqual([0, null, 'anchor_invalid', String(count)]);
			expect(f.message).toMatch(/digest 9.*written directly into the database/);
		}
	});
});
