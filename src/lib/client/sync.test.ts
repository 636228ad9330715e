import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { openOfflineStore, type OfflineStore } from './offline-store';
import {
	computeSyncState,
	enqueue,
	listOutbox,
	listPhotos,
	listRefused,
	readSnapshot,
	readSyncMeta,
	seededRandom,
	type OutboxRecord
} from './outbox';
import { nothingSent, parseBatchReply, syncOnTriggers, syncOnce, type SyncResult, type Timers } from './sync';
import { fakeServer, freshDbName, recordMaker, tally } from './test-helpers';

const T0 = Date.UTC(2026, 11, 1, 8, 0);
const MINUTE = 60_000;

function clock(start = T0) {
	let t = start;
	return { now: () => t, advance: (ms: number) => (t += ms) };
}

/** No record is lost: each enqueued id is still on the tablet (waiting or refused) or stored by the server. */
async function expectNoneLost(store: OfflineStore, enqueued: string[], serverStored: string[]) {
	const onTablet = [
		...(await listOutbox(store)).map((i) => i.record.id),
		...(await listRefused(store)).map((r) => r.record.id)
	];
	for (const id of enqueued) expect(onTablet.includes(id) || serverStored.includes(id), `record ${id} lost`).toBe(true);
}

async function fill(store: OfflineStore, records: OutboxRecord[]) {
	for (const r of records) await enqueue(store, r, { now: r.signedAt });
}

describe('syncOnce', () => {
	it('fails, partly succeeds, loses an answer, then succeeds: every record stored once, none lost or doubled', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('sync') });
		const c = clock();
		const random = seededRandom(11);
		const server = fakeServer({ refuseKinds: ['finding'], clock: c.now });
		const make = recordMaker(21);
		const records = Array.from({ length: 8 }, (_, i) => make('run-1', T0 + i, i === 5 ? 'finding' : 'signoff'));
		const ids = records.map((r) => r.id);
		await fill(store, records);
		const deps = { store, fetchBatch: server.fetchBatch, now: c.now, random, batchSize: 3 };

		// 1. The network is down: nothing reaches the server, everything stays, a retry is scheduled.
		server.then('down');
		const down = await syncOnce(deps);
		expect(down).toMatchObject({ status: 'failed', sent: 3, error: 'Failed to fetch' });
		expect(server.received).toEqual([]);
		expect((await listOutbox(store)).map((i) => i.record.id)).toEqual(ids);
		const meta = await readSyncMeta(store);
		expect(meta.failures).toBe(1);
		expect(meta.nextAttemptAt! - T0).toBeGreaterThanOrEqual(1_000); // attempt 1: [1 s, 2 s)
		expect(meta.nextAttemptAt! - T0).toBeLessThan(2_000);

		// Before the retry time an interval sync does nothing; the server sees no request.
		expect(await syncOnce(deps)).toMatchObject({ status: 'backoff', sent: 0, nextAttemptAt: meta.nextAttemptAt });
		expect(server.received).toEqual([]);
		await expectNoneLost(store, ids, server.stored);

		// 2. The server answers two of three.
		c.advance(MINUTE);
		server.then({ partial: 2 });
		expect(await syncOnce(deps)).toMatchObject({ status: 'partial', sent: 3, accepted: 2 });
		expect((await listOutbox(store)).map((i) => i.record.id)).toEqual(ids.slice(2));
		expect((await readSyncMeta(store)).failures).toBe(2);
		await expectNoneLost(store, ids, server.stored);

		// 3. The server stores the batch but the answer is lost on the way back.
		c.advance(MINUTE);
		server.then('lose-answer');
		expect(await syncOnce(deps)).toMatchObject({ status: 'failed', sent: 3, accepted: 0 });
		expect((await listOutbox(store)).map((i) => i.record.id)).toEqual(ids.slice(2));
		await expectNoneLost(store, ids, server.stored);

		// 4. All good: the lost batch comes back as duplicates, the rest is accepted, the forbidden one refused.
		c.advance(MINUTE);
		const done = await syncOnce(deps);
		expect(done).toMatchObject({ status: 'done', sent: 6, accepted: 2, duplicate: 3, refused: 1 });
		await expectNoneLost(store, ids, server.stored);

		const expectedStored = ids.filter((_, i) => i !== 5);
		expect([...server.stored].sort()).toEqual([...expectedStored].sort());
		expect(Object.values(tally(server.stored))).toEqual(expectedStored.map(() => 1));
		expect(tally(server.received)).toEqual({
			[ids[0]]: 1,
			[ids[1]]: 1,
			[ids[2]]: 3, // unanswered in 2, answer lost in 3, duplicate in 4
			[ids[3]]: 2,
			[ids[4]]: 2,
			[ids[5]]: 1,
			[ids[6]]: 1,
			[ids[7]]: 1
		});
		expect(server.duplicates).toEqual([ids[2], ids[3], ids[4]]);
		expect([...new Set(server.received)]).toEqual(ids); // first sight in enqueue order
		expect(server.concurrentDoubles).toEqual([]);

		expect(await listOutbox(store)).toEqual([]);
		expect((await listRefused(store)).map((r) => [r.record.id, r.reason])).toEqual([
			[ids[5], 'Kind finding is not allowed here.']
		]);
		const state = computeSyncState(await readSnapshot(store), c.now());
		expect(state).toMatchObject({
			waiting: 0,
			refused: 1,
			lastSuccessAt: c.now(),
			nextAttemptAt: null,
			lastError: null
		});
		expect((await readSyncMeta(store)).failures).toBe(0);
		await store.close();
	});

	it('survives a reload between a failed and a successful sync', async () => {
		const dbName = freshDbName('sync-reload');
		const c = clock();
		const server = fakeServer({ clock: c.now });
		const make = recordMaker(22);
		const records = [0, 1, 2].map((i) => make('run-1', T0 + i));
		let store = await openOfflineStore({ dbName, now: c.now() });
		await fill(store, records);
		server.then('lose-answer');
		await syncOnce({ store, fetchBatch: server.fetchBatch, now: c.now, random: seededRandom(1) });
		await store.close();

		c.advance(MINUTE);
		store = await openOfflineStore({ dbName, now: c.now() });
		expect(await syncOnce({ store, fetchBatch: server.fetchBatch, now: c.now, random: seededRandom(1) })).toMatchObject(
			{
				status: 'done',
				duplicate: 3
			}
		);
		expect(server.stored).toEqual(records.map((r) => r.id));
		await store.close();
	});

	it('ignores the retry schedule when forced (reconnect, "sync now")', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('force') });
		const c = clock();
		const server = fakeServer();
		await fill(store, [recordMaker(23)('run-1', T0)]);
		server.then('down');
		const deps = { store, fetchBatch: server.fetchBatch, now: c.now, random: seededRandom(2) };
		await syncOnce(deps);
		expect((await syncOnce(deps)).status).toBe('backoff');
		expect(await syncOnce({ ...deps, force: true })).toMatchObject({ status: 'done', accepted: 1 });
		await store.close();
	});

	it('never sends a record twice at once: a second sync on the page is busy, another handle takes other records', async () => {
		const dbName = freshDbName('lock');
		const c = clock();
		const server = fakeServer();
		const make = recordMaker(24);
		const records = [0, 1, 2, 3].map((i) => make('run-1', T0 + i));
		const a = await openOfflineStore({ dbName, now: c.now() });
		await fill(a, records);
		const open = server.hold();
		const deps = { fetchBatch: server.fetchBatch, now: c.now, random: seededRandom(3), batchSize: 2 };
		const first = syncOnce({ ...deps, store: a });
		while (server.received.length < 2) await new Promise((r) => setTimeout(r, 1));

		expect((await syncOnce({ ...deps, store: a })).status).toBe('busy');
		const b = await openOfflineStore({ dbName, now: c.now() }); // another tab: must not steal a's live batch
		const second = syncOnce({ ...deps, store: b });
		while (server.received.length < 4) await new Promise((r) => setTimeout(r, 1));
		open();
		const results: SyncResult[] = await Promise.all([first, second]);
		expect(results.map((r) => r.status)).toEqual(['done', 'done']);
		expect(server.concurrentDoubles).toEqual([]);
		expect(tally(server.received)).toEqual(Object.fromEntries(records.map((r) => [r.id, 1])));
		expect(await listOutbox(a)).toEqual([]);
		await a.close();
		await b.close();
	});

	it('uploads a photo only after its record was accepted, and retries it until stored', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('photo-sync') });
		const c = clock();
		const server = fakeServer();
		const record = recordMaker(25)('run-1', T0);
		await enqueue(store, record, { now: T0, photos: [{ id: 'ph-1', sha256: 'ff', blob: new Blob(['jpeg bytes']) }] });
		const uploads: string[] = [];
		let photoServerUp = false;
		const uploadPhoto = async (photo: { id: string; recordId: string }) => {
			uploads.push(photo.id);
			expect(server.stored).toContain(photo.recordId); // record first
			if (!photoServerUp) throw new Error('Failed to fetch');
			return { status: 'stored' as const };
		};
		const deps = { store, fetchBatch: server.fetchBatch, uploadPhoto, now: c.now, random: seededRandom(4) };

		server.then('down');
		await syncOnce(deps);
		expect(uploads).toEqual([]);

		c.advance(MINUTE);
		expect(await syncOnce(deps)).toMatchObject({ status: 'partial', accepted: 1, photosFailed: 1 });
		expect((await listPhotos(store))[0]).toMatchObject({ attempts: 1, lastError: 'Failed to fetch' });
		expect(computeSyncState(await readSnapshot(store), c.now())).toMatchObject({ waiting: 0, photosWaiting: 1 });

		c.advance(MINUTE);
		photoServerUp = true;
		expect(await syncOnce(deps)).toMatchObject({ status: 'done', photosStored: 1 });
		expect(uploads).toEqual(['ph-1', 'ph-1']);
		expect(await listPhotos(store)).toEqual([]);
		await store.close();
	});

	it('measures the clock offset from the server time and flags records beyond 5 minutes', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('skew-sync') });
		const c = clock();
		const server = fakeServer({ clock: c.now, skewMs: 6 * MINUTE, refuseKinds: ['finding'] });
		const make = recordMaker(26);
		const [ok, bad, later] = [make('run-1', T0, 'signoff'), make('run-1', T0 + 1, 'finding'), make('run-1', T0 + 2)];
		await fill(store, [ok, bad]);
		await syncOnce({ store, fetchBatch: server.fetchBatch, now: c.now, random: seededRandom(5) });
		expect((await readSyncMeta(store)).clockOffsetMs).toBe(6 * MINUTE);
		await enqueue(store, later, { now: T0 + 2 });
		const state = computeSyncState(await readSnapshot(store), c.now());
		expect(state.records.map((r) => [r.id, r.status, r.clockSkew])).toEqual([
			[later.id, 'waiting', true],
			[bad.id, 'refused', true]
		]);
		await store.close();
	});
});

describe('parseBatchReply', () => {
	it('accepts the route shape and falls back to the Date header for server time', () => {
		const answers = [
			{ id: 'a', status: 'accepted' },
			{ id: 'b', status: 'refused', reason: 'revoked tablet' }
		];
		expect(parseBatchReply({ answers, serverTime: 5 })).toEqual({ answers, serverTime: 5 });
		expect(parseBatchReply({ answers }, 'Tue, 01 Dec 2026 08:00:00 GMT')).toEqual({ answers, serverTime: T0 });
		expect(parseBatchReply({ answers: [] })).toEqual({ answers: [] });
	});

	it.each([
		[null],
		['<html>proxy error</html>'],
		[{ answers: [{ id: 'a', status: 'kept' }] }],
		[{ answers: [{ status: 'accepted' }] }]
	])('throws on %j so the batch stays queued', (body) => {
		expect(() => parseBatchReply(body)).toThrow(/sync reply/);
	});
});

function fakeTimers() {
	let nextId = 1;
	const intervals = new Map<number, () => void>();
	const timeouts = new Map<number, { fn: () => void; ms: number }>();
	const timers: Timers = {
		setInterval: (fn) => (intervals.set(nextId, fn), nextId++),
		clearInterval: (h) => void intervals.delete(h as number),
		setTimeout: (fn, ms) => (timeouts.set(nextId, { fn, ms }), nextId++),
		clearTimeout: (h) => void timeouts.delete(h as number)
	};
	return { timers, intervals, timeouts };
}

describe('syncOnTriggers', () => {
	const idle: SyncResult = nothingSent();
	const flush = () => new Promise((r) => setTimeout(r, 0));

	it('syncs at start, on online (forced), on the interval, at the retry time and on demand; stop removes all', async () => {
		const calls: [boolean, string][] = [];
		const c = clock();
		let next: SyncResult = idle;
		const events = new EventTarget();
		const { timers, intervals, timeouts } = fakeTimers();
		const triggers = syncOnTriggers({
			sync: async (force, reason) => (calls.push([force, reason]), next),
			events,
			timers,
			now: c.now
		});
		await flush();
		events.dispatchEvent(new Event('online'));
		await flush();
		[...intervals.values()][0]();
		await flush();
		next = { ...idle, status: 'failed', nextAttemptAt: T0 + 4_000 };
		await triggers.syncNow();
		expect([...timeouts.values()].map((t) => t.ms)).toEqual([4_000]);
		next = idle;
		const [[retryId, retry]] = [...timeouts.entries()];
		timeouts.delete(retryId); // a fired timeout is gone
		retry.fn();
		await flush();
		expect(calls).toEqual([
			[false, 'start'],
			[true, 'online'],
			[false, 'interval'],
			[true, 'demand'],
			[false, 'retry']
		]);

		triggers.stop();
		events.dispatchEvent(new Event('online'));
		await flush();
		expect(calls).toHaveLength(5);
		expect(intervals.size).toBe(0);
		expect(timeouts.size).toBe(0);
	});

	it('turns a thrown sync into a failed result instead of an unhandled rejection', async () => {
		const results: SyncResult[] = [];
		const { timers } = fakeTimers();
		const triggers = syncOnTriggers({
			sync: async () => {
				throw new Error('IndexedDB is gone');
			},
			events: new EventTarget(),
			timers,
			now: () => T0,
			onResult: (r) => results.push(r)
		});
		expect(await triggers.syncNow()).toMatchObject({ status: 'failed', error: 'IndexedDB is gone' });
		expect(results.map((r) => r.status)).toEqual(['failed', 'failed']);
		triggers.stop();
	});

	it('drives syncOnce end to end: an offline start, then the online event drains the outbox', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('triggers') });
		const c = clock();
		const server = fakeServer();
		await fill(store, [recordMaker(27)('run-1', T0)]);
		server.then('down');
		const { timers } = fakeTimers();
		const events = new EventTarget();
		const results: SyncResult[] = [];
		const triggers = syncOnTriggers({
			sync: (force) => syncOnce({ store, fetchBatch: server.fetchBatch, now: c.now, random: seededRandom(6), force }),
			events,
			timers,
			now: c.now,
			onResult: (r) => results.push(r)
		});
		while (results.length < 1) await flush();
		events.dispatchEvent(new Event('online'));
		while (results.length < 2) await flush();
		expect(results.map((r) => r.status)).toEqual(['failed', 'done']);
		expect(await listOutbox(store)).toEqual([]);
		triggers.stop();
		await store.close();
	});
});
