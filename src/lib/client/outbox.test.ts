import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { KEYS, getRun, openOfflineStore, saveRun, type EntryInProgress, type OfflineRun } from './offline-store';
import {
	CLOCK_SKEW_LIMIT_MS,
	IN_FLIGHT_LEASE_MS,
	STALE_AFTER_MS,
	applyAnswers,
	claimBatch,
	computeSyncState,
	enqueue,
	listOutbox,
	listPhotos,
	listRefused,
	nextBatch,
	photosDue,
	releaseBatch,
	seededRandom,
	settlePhoto,
	type OutboxItem,
	type OutboxSnapshot
} from './outbox';
import { freshDbName, makeRun, recordMaker } from './test-helpers';

const T0 = Date.UTC(2026, 11, 1, 8, 0);
const HOUR = 60 * 60_000;

function signStep(stepId: string, recordId: string, at: number) {
	return (run: OfflineRun): OfflineRun => ({ ...run, signed: [...run.signed, { stepId, recordId, signedAt: at }] });
}

describe('enqueue: the record and the run state it changes in one transaction', () => {
	it('writes record, entry, photo and run change together', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('enqueue') });
		await saveRun(store, makeRun('run-1'));
		const record = recordMaker(1)('run-1', T0);
		const entry: EntryInProgress = {
			runId: 'run-1',
			stepId: 's1',
			checkpointId: 'torque',
			value: '24',
			updatedAt: T0,
			recordId: record.id
		};
		const photo = { id: 'ph-1', sha256: 'ab'.repeat(32), blob: new Blob([new Uint8Array([1, 2, 3])]) };
		await enqueue(store, record, {
			now: T0,
			entries: [entry],
			photos: [photo],
			updateRun: signStep('s1', record.id, T0)
		});

		expect((await listOutbox(store)).map((i) => i.record)).toEqual([record]);
		expect(await store.get(KEYS.entry('run-1', 's1', 'torque'))).toEqual(entry);
		expect((await getRun(store, 'run-1'))?.signed).toEqual([{ stepId: 's1', recordId: record.id, signedAt: T0 }]);
		const [queued] = await listPhotos(store);
		expect(queued).toMatchObject({ id: 'ph-1', recordId: record.id, attempts: 0 });
		expect(queued.recordStoredAt).toBeUndefined();
		expect(queued.blob.size).toBe(3);
		await store.close();
	});

	it('writes nothing when the run-state put fails after the record put (value cannot be cloned)', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('enqueue-fail') });
		await saveRun(store, makeRun('run-1'));
		const make = recordMaker(2);
		await enqueue(store, make('run-1', T0), { now: T0 });
		const before = await getRun(store, 'run-1');

		const bad = make('run-1', T0 + 1);
		const entry: EntryInProgress = { runId: 'run-1', stepId: 's1', checkpointId: 'torque', value: '24', updatedAt: T0 };
		const poisoned = (run: OfflineRun) => ({ ...run, onSign: () => 'a function cannot be structured-cloned' });
		await expect(enqueue(store, bad, { now: T0 + 1, entries: [entry], updateRun: poisoned })).rejects.toThrow(/clone/i);

		expect((await listOutbox(store)).map((i) => i.record.id)).not.toContain(bad.id);
		expect(await listOutbox(store)).toHaveLength(1);
		expect(await store.get(KEYS.seq())).toBe(1);
		expect(await store.get(KEYS.entry('run-1', 's1', 'torque'))).toBeUndefined();
		expect(await getRun(store, 'run-1')).toEqual(before);
		await store.close();
	});

	it('writes nothing when the run is not on the tablet', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('enqueue-norun') });
		const record = recordMaker(3)('run-x', T0);
		await expect(enqueue(store, record, { now: T0, updateRun: signStep('s1', record.id, T0) })).rejects.toThrow(
			'Run run-x is not on this tablet; the record was not stored.'
		);
		expect(await listOutbox(store)).toEqual([]);
		await store.close();
	});
});

describe('enqueue: ids', () => {
	it('refuses a record whose id is not a uuid v7', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('enqueue-id') });
		const record = { ...recordMaker(10)('run-1', T0), id: '4f9c2a1e-0000-4000-8000-000000000000' };
		await expect(enqueue(store, record, { now: T0 })).rejects.toThrow(/is not a uuid v7; the record was not stored/);
		expect(await listOutbox(store)).toEqual([]);
		await store.close();
	});
});

describe('outbox order', () => {
	it('is strict FIFO across restarts, even when the device clock goes back', async () => {
		const dbName = freshDbName('fifo');
		const make = recordMaker(4);
		let store = await openOfflineStore({ dbName });
		const ids: string[] = [];
		// Enqueue times: later, earlier (clock set back), equal — order must still be enqueue order.
		for (const t of [T0 + 5000, T0, T0]) {
			const r = make('run-1', t);
			ids.push(r.id);
			await enqueue(store, r, { now: t });
		}
		await store.close();

		store = await openOfflineStore({ dbName });
		for (const t of [T0 - 60_000, T0 + 1]) {
			const r = make('run-1', t);
			ids.push(r.id);
			await enqueue(store, r, { now: t });
		}
		await store.close();

		store = await openOfflineStore({ dbName });
		const items = await listOutbox(store);
		expect(items.map((i) => i.record.id)).toEqual(ids);
		expect(items.map((i) => i.seq)).toEqual([1, 2, 3, 4, 5]);
		expect((await nextBatch(store, 2)).map((i) => i.record.id)).toEqual(ids.slice(0, 2));
		await store.close();
	});

	it('ends a batch at the first record of another run, so nothing overtakes an older record', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('runs') });
		const make = recordMaker(5);
		const runs = ['a', 'a', 'b', 'a'];
		const records = runs.map((run, i) => make(run, T0 + i));
		for (const r of records) await enqueue(store, r, { now: r.signedAt });
		expect((await nextBatch(store, 10)).map((i) => i.record.id)).toEqual([records[0].id, records[1].id]);
		expect((await nextBatch(store, 1)).map((i) => i.record.id)).toEqual([records[0].id]);
		await store.close();
	});

	it('claims a batch by marking it in flight; another caller gets the next records; release keeps the place', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('claim') });
		const make = recordMaker(6);
		const records = [0, 1, 2].map((i) => make('run-1', T0 + i));
		for (const r of records) await enqueue(store, r, { now: r.signedAt });
		const claimed = await claimBatch(store, 2, T0 + 10);
		expect(claimed.map((i) => [i.record.id, i.attempts, i.inFlight?.session])).toEqual([
			[records[0].id, 1, store.session],
			[records[1].id, 1, store.session]
		]);
		expect((await claimBatch(store, 2, T0 + 11)).map((i) => i.record.id)).toEqual([records[2].id]);
		expect(await nextBatch(store, 5, T0 + 12)).toEqual([]);
		await releaseBatch(store, [records[0].id, records[1].id]);
		expect((await nextBatch(store, 5, T0 + 12)).map((i) => i.record.id)).toEqual([records[0].id, records[1].id]);
		// The third record's marker was never released: it holds for the lease, then frees the record.
		expect((await nextBatch(store, 5, T0 + 11 + IN_FLIGHT_LEASE_MS - 1)).map((i) => i.record.id)).toHaveLength(2);
		expect((await nextBatch(store, 5, T0 + 11 + IN_FLIGHT_LEASE_MS)).map((i) => i.record.id)).toHaveLength(3);
		await store.close();
	});
});

describe('applyAnswers', () => {
	it('removes accepted and duplicate, keeps refused with the reason, ignores unknown ids, keeps unanswered', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('answers') });
		const make = recordMaker(7);
		const [a, b, c, d, e] = [0, 1, 2, 3, 4].map((i) => make('run-1', T0 + i));
		for (const r of [a, b, c, d, e]) await enqueue(store, r, { now: r.signedAt });
		await claimBatch(store, 5, T0 + 10);
		const done = await applyAnswers(
			store,
			[
				{ id: a.id, status: 'accepted' },
				{ id: b.id, status: 'duplicate' },
				{ id: c.id, status: 'refused', reason: 'The run was released before this record arrived.' },
				{ id: d.id, status: 'refused' },
				{ id: 'not-here', status: 'accepted' },
				{ id: a.id, status: 'refused', reason: 'second answer for the same id is ignored' }
			],
			{ now: T0 + 20, release: [a.id, b.id, c.id, d.id, e.id] }
		);
		expect(done).toEqual({ accepted: [a.id], duplicate: [b.id], refused: [c.id, d.id], unknown: ['not-here', a.id] });
		const left = await listOutbox(store);
		expect(left.map((i) => i.record.id)).toEqual([e.id]);
		expect(left[0].inFlight).toBeUndefined();
		const refused = await listRefused(store);
		expect(refused.map((r) => [r.record.id, r.reason, r.refusedAt])).toEqual([
			[c.id, 'The run was released before this record arrived.', T0 + 20],
			[d.id, 'The server refused this record without giving a reason.', T0 + 20]
		]);
		await store.close();
	});

	it('releases a photo for upload only when its record was stored; photos retry until stored', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('photos') });
		const make = recordMaker(8);
		const r = make('run-1', T0);
		await enqueue(store, r, { now: T0, photos: [{ id: 'ph', sha256: '00', blob: new Blob(['x']) }] });
		expect(await photosDue(store, T0 + HOUR)).toEqual([]);
		await applyAnswers(store, [{ id: r.id, status: 'accepted' }], { now: T0 + 5 });
		const [photo] = await photosDue(store, T0 + 5);
		expect(photo.recordStoredAt).toBe(T0 + 5);

		await settlePhoto(store, photo, new Error('Failed to fetch'), T0 + 6, () => 0);
		const [retrying] = await listPhotos(store);
		expect(retrying).toMatchObject({ attempts: 1, nextAttemptAt: T0 + 6 + 1_000, lastError: 'Failed to fetch' });
		expect(await photosDue(store, T0 + 6 + 999)).toEqual([]);
		expect(await photosDue(store, T0 + 6 + 999, true)).toHaveLength(1);
		await settlePhoto(store, retrying, { status: 'stored' }, T0 + 2000, seededRandom(1));
		expect(await listPhotos(store)).toEqual([]);
		await store.close();
	});
});

function item(seq: number, enqueuedAt: number, extra: Partial<OutboxItem> = {}): OutboxItem {
	return {
		seq,
		enqueuedAt,
		attempts: 0,
		record: { id: `r${seq}`, runId: 'run-1', kind: 'signoff', signedAt: enqueuedAt, body: {} },
		...extra
	};
}

const empty: OutboxSnapshot = { waiting: [], refused: [], photos: [], meta: { failures: 0 } };

describe('computeSyncState', () => {
	it('is all clear for an empty outbox', () => {
		expect(computeSyncState(empty, T0)).toMatchObject({
			waiting: 0,
			refused: 0,
			oldestWaitingAt: null,
			staleWarning: false,
			lastSuccessAt: null
		});
	});

	// 8 h and 5 min are issue 7's rules ("common practice, no source" for the shop); "more than" is strict.
	it.each([
		[STALE_AFTER_MS - 1, false],
		[STALE_AFTER_MS, false],
		[STALE_AFTER_MS + 1, true],
		[30 * HOUR, true]
	])('held for %i ms → stale warning %s', (age, stale) => {
		const snapshot = { ...empty, waiting: [item(2, T0 + HOUR), item(1, T0)] };
		const state = computeSyncState(snapshot, T0 + age);
		expect(state.oldestWaitingAt).toBe(T0);
		expect(state.staleWarning).toBe(stale);
	});

	it('counts a waiting photo as held, and refused photos as refused', () => {
		const photo = {
			seq: 9,
			id: 'p',
			recordId: 'r1',
			runId: 'run-1',
			sha256: '',
			blob: new Blob([]),
			enqueuedAt: T0,
			attempts: 0
		};
		const refusedPhoto = { ...photo, seq: 10, refused: { at: T0, reason: 'not an image' } };
		const state = computeSyncState({ ...empty, photos: [photo, refusedPhoto] }, T0 + STALE_AFTER_MS + 1);
		expect(state).toMatchObject({ waiting: 0, photosWaiting: 1, refused: 1, staleWarning: true });
	});

	it.each([
		[undefined, false],
		[CLOCK_SKEW_LIMIT_MS, false],
		[CLOCK_SKEW_LIMIT_MS + 1, true],
		[-CLOCK_SKEW_LIMIT_MS - 1, true],
		[-60_000, false]
	])('clock offset %s ms → skew flag %s', (offset, flag) => {
		const snapshot: OutboxSnapshot = {
			...empty,
			waiting: [item(1, T0, { clockOffsetMs: offset })],
			refused: [
				{ seq: 2, record: item(2, T0).record, enqueuedAt: T0, refusedAt: T0, reason: 'no', clockOffsetMs: offset }
			]
		};
		const records = computeSyncState(snapshot, T0).records;
		expect(records.map((r) => [r.id, r.status, r.clockSkew])).toEqual([
			['r1', 'waiting', flag],
			['r2', 'refused', flag]
		]);
	});

	it('reports sending, last success, retry time and error from the stored state', () => {
		const snapshot: OutboxSnapshot = {
			...empty,
			waiting: [item(1, T0, { inFlight: { at: T0, session: 's' } }), item(2, T0)],
			meta: {
				failures: 2,
				lastSuccessAt: T0 - HOUR,
				nextAttemptAt: T0 + 4000,
				lastError: 'Failed to fetch',
				clockOffsetMs: 1200
			}
		};
		expect(computeSyncState(snapshot, T0)).toMatchObject({
			waiting: 2,
			lastSuccessAt: T0 - HOUR,
			nextAttemptAt: T0 + 4000,
			lastError: 'Failed to fetch',
			clockOffsetMs: 1200,
			records: [
				{ id: 'r1', status: 'sending' },
				{ id: 'r2', status: 'waiting' }
			]
		});
	});
});

describe('clock offset per record', () => {
	it('copies the last measured offset onto a new record and refreshes it on each answered exchange', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('skew') });
		const make = recordMaker(9);
		await store.set(KEYS.sync(), { failures: 0, clockOffsetMs: 7 * 60_000 });
		const a = make('run-1', T0);
		const b = make('run-1', T0 + 1);
		await enqueue(store, a, { now: T0 });
		await enqueue(store, b, { now: T0 + 1 });
		expect((await listOutbox(store)).map((i) => i.clockOffsetMs)).toEqual([420_000, 420_000]);
		await applyAnswers(store, [{ id: a.id, status: 'refused', reason: 'clock' }], {
			now: T0 + 2,
			clockOffsetMs: -400_000
		});
		expect((await listRefused(store))[0].clockOffsetMs).toBe(-400_000);
		expect((await listOutbox(store))[0].clockOffsetMs).toBe(-400_000);
		await store.close();
	});
});
