import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { appendTo, headOf, verifyChain } from './chain';
import { ChainScreen } from './chain-screen';
import { recordHash, type StoredRecord } from './record';
import { createUuidV7 } from './uuid-v7';

const RUNS = ['4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a', '9c1d2e3f-4a5b-4c6d-8e7f-0a1b2c3d4e5f'];

let clock = 1_764_600_000_000;
const newId = createUuidV7({ now: () => clock++, random: (b) => b.fill(3) });

/** A run's chain as the server appends it (invented KTX-7 bore readings, not service data). */
function chain(runId: string, length: number): StoredRecord[] {
	const out: StoredRecord[] = [];
	for (let n = 1; n <= length; n++) {
		out.push(
			appendTo(out.length ? headOf(out.at(-1)!) : null, {
				id: newId(),
				runId,
				kind: 'attempt',
				body: { checkpoint: `bore-${n}`, value: `12.70${n % 10}`, unit: 'mm' }
			})
		);
	}
	return out;
}

const sealed = (r: StoredRecord): StoredRecord => ({ ...r, hash: recordHash(r) });

const screenOf = (records: StoredRecord[], anchored: Record<string, number[]> = {}, maxAhead?: number) => {
	const screen = new ChainScreen((runId) => (anchored[runId] ? new Set(anchored[runId]) : undefined), maxAhead);
	for (const r of records) screen.add(r, recordHash(r) === r.hash);
	return screen;
};

/** What the ordered verify reads for one run: its records by seq (ties in any order, as SQL leaves them). */
const ordered = (records: StoredRecord[], runId: string) =>
	records.filter((r) => r.runId === runId).sort((a, b) => a.seq - b.seq);

describe('ChainScreen', () => {
	it('passes intact chains fed in order, reversed or interleaved, with their heads and counts', () => {
		const a = chain(RUNS[0], 6);
		const b = chain(RUNS[1], 4);
		for (const feed of [
			[...a, ...b],
			[...a, ...b].reverse(),
			[a[0], b[0], a[2], b[1], a[1], ...b.slice(2), ...a.slice(3)]
		]) {
			const screen = screenOf(feed);
			expect(screen.result(RUNS[0])).toMatchObject({ intact: true, count: 6, head: a[5].hash });
			expect(screen.result(RUNS[1])).toMatchObject({ intact: true, count: 4, head: b[3].hash });
		}
	});

	it('reports a run with no records as an empty intact chain', () => {
		expect(screenOf([]).result(RUNS[0])).toEqual({ intact: true, count: 0, head: null, heads: new Map() });
	});

	it('keeps the hash after each anchored count, whether that record came in order or ahead of its predecessor', () => {
		const a = chain(RUNS[0], 5);
		for (const feed of [a, [a[4], a[2], a[0], a[1], a[3]]]) {
			const r = screenOf(feed, { [RUNS[0]]: [2, 5, 9] }).result(RUNS[0]);
			expect(r.intact && [...r.heads]).toEqual([
				[2, a[1].hash],
				[5, a[4].hash]
			]);
		}
	});

	it('fails a chain with an edited record, a broken link, a gap, a repeated seq, a repeated id or a first record with a previous hash', () => {
		const a = chain(RUNS[0], 4);
		const edited = a.map((r, i) =>
			i === 2 ? { ...r, body: { checkpoint: 'bore-3', value: '12.690', unit: 'mm' } } : r
		);
		const relinked = a.map((r, i) => (i === 2 ? { ...r, prevHash: a[0].hash } : r));
		const repeatedId = a.map((r, i) => (i === 3 ? { ...r, id: a[1].id } : r));
		const firstWithPrev = [{ ...a[0], prevHash: a[3].hash }, ...a.slice(1)];
		const cases = {
			edited,
			relinked: relinked.map((r) => ({ ...r, hash: r.seq === 3 ? recordHash(r) : r.hash })),
			gap: [a[0], a[1], a[3]],
			repeatedSeq: [...a, a[2]],
			repeatedId: repeatedId.map((r) => ({ ...r, hash: r.seq === 4 ? recordHash(r) : r.hash })),
			firstWithPrev: firstWithPrev.map((r) => ({ ...r, hash: r.seq === 1 ? recordHash(r) : r.hash })),
			// An earlier seq re-sealed to follow the current head: its link alone looks right.
			staleSeq: [...a, sealed({ ...a[1], id: newId(), prevHash: a[3].hash })]
		};
		for (const [name, records] of Object.entries(cases)) {
			expect({ name, intact: screenOf(records).result(RUNS[0]).intact }).toEqual({ name, intact: false });
			expect({ name, ok: verifyChain(ordered(records, RUNS[0])).ok }).toEqual({ name, ok: false });
		}
	});

	it('gives up on every run (so all are checked in order) once more records wait ahead than it may hold', () => {
		const a = chain(RUNS[0], 5);
		const b = chain(RUNS[1], 2);
		const screen = screenOf([...b, ...a.slice().reverse()], {}, 3);
		expect(screen.gaveUp).toBe(true);
		expect(screen.result(RUNS[0]).intact).toBe(false);
		expect(screen.result(RUNS[1]).intact).toBe(false);
		expect(screen.result('a run with no records').intact).toBe(false);
		expect(screenOf([...b, ...a.slice().reverse()], {}, 4).result(RUNS[0]).intact).toBe(true);
	});

	it('passes a chain exactly when the ordered verifyChain does, whatever was done to it and in whatever order it arrives', () => {
		const base = [chain(RUNS[0], 7), chain(RUNS[1], 5)];
		const change = fc.record({
			run: fc.integer({ min: 0, max: 1 }),
			at: fc.nat(),
			to: fc.nat(),
			what: fc.constantFrom('none', 'edit', 'rehash', 'delete', 'copy', 'reseq', 'relink', 'move', 'reid', 'truncate')
		});
		fc.assert(
			fc.property(
				fc.array(change, { maxLength: 3 }),
				fc.array(fc.nat(), { minLength: 12, maxLength: 12 }),
				(changes, order) => {
					const runs = base.map((c) => c.map((r) => ({ ...r })));
					for (const c of changes) {
						const list = runs[c.run];
						if (!list.length) continue;
						const i = c.at % list.length;
						const j = c.to % list.length;
						const r = list[i];
						if (c.what === 'edit') r.body = { checkpoint: 'bore', value: '12.690', unit: 'mm' };
						if (c.what === 'rehash') r.hash = recordHash({ ...r, body: 'x' });
						if (c.what === 'delete') list.splice(i, 1);
						if (c.what === 'copy') list.push({ ...r });
						if (c.what === 'reseq') r.seq = list[j].seq;
						if (c.what === 'relink') r.prevHash = list[j].hash;
						if (c.what === 'move') r.runId = RUNS[1 - c.run];
						if (c.what === 'reid') r.id = list[j].id;
						if (c.what === 'truncate') list.length = i;
						// Most changes also re-seal the record, as someone with database access and the source code could.
						if (c.what !== 'edit' && c.what !== 'rehash' && c.what !== 'delete' && c.what !== 'truncate' && list[i])
							list[i].hash = recordHash(list[i]);
					}
					const all = runs.flat();
					const keyed = all.map((r, k) => ({ r, k: order[k % order.length] * 100 + k }));
					const feed = keyed.sort((x, y) => x.k - y.k).map((x) => x.r);
					const screen = screenOf(feed);
					for (const runId of RUNS) {
						const exact = verifyChain(ordered(all, runId));
						const screened = screen.result(runId);
						expect(screened.intact).toBe(exact.ok);
						if (screened.intact && exact.ok) expect([screened.head, screened.count]).toEqual([exact.head, exact.count]);
					}
				}
			),
			{ numRuns: 400 }
		);
	});
});
