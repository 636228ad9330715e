import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { setMany as keyvalSetMany } from 'idb-keyval';
import {
	IN_FLIGHT_LEASE_MS,
	KEYS,
	MIGRATIONS,
	OfflineStoreTooNewError,
	SCHEMA_VERSION,
	createStore,
	entriesOfRun,
	getRun,
	listRuns,
	migrate,
	openOfflineStore,
	saveEntry,
	saveRun,
	type Migration,
	type OfflineRun
} from './offline-store';
import { freshDbName, makeRun } from './test-helpers';

describe('typed idb-keyval interface', () => {
	it('reads and writes through get, set, update, getMany, setMany, entries and delMany', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('kv') });
		await store.set(['meta', 'a'], 1);
		await store.setMany([
			[['meta', 'b'], 2],
			[['meta', 'c'], 3]
		]);
		await store.update<number>(['meta', 'a'], (old) => (old ?? 0) + 10);
		expect(await store.get(['meta', 'a'])).toBe(11);
		expect(
			await store.getMany([
				['meta', 'b'],
				['meta', 'c'],
				['meta', 'nope']
			])
		).toEqual([2, 3, undefined]);
		await store.delMany([['meta', 'b']]);
		const all = await store.entries();
		expect(all).toContainEqual([['meta', 'c'], 3]);
		expect(all).not.toContainEqual([['meta', 'b'], 2]);
		expect(all).toContainEqual([KEYS.schema(), SCHEMA_VERSION]);
		await store.close();
	});

	it('keeps runs and entries apart by key prefix', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('runs') });
		await saveRun(store, makeRun('run-a'));
		await saveRun(store, makeRun('run-b'));
		const entry = { stepId: 's1', checkpointId: 'c1', value: '24.0', updatedAt: 1 };
		await saveEntry(store, { runId: 'run-a', ...entry });
		await saveEntry(store, { runId: 'run-b', ...entry, value: '25.0' });
		expect((await listRuns(store)).map((r) => r.runId)).toEqual(['run-a', 'run-b']);
		expect((await getRun(store, 'run-a'))?.model.steps).toHaveLength(1);
		expect(await entriesOfRun(store, 'run-b')).toEqual([{ runId: 'run-b', ...entry, value: '25.0' }]);
		await store.close();
	});

	it('refuses use after close', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('closed') });
		await store.close();
		await expect(store.get(['meta', 'x'])).rejects.toThrow(/closed/);
	});
});

/** Schema 1 of this test: runs kept their image ids as plain strings and had no `signed` list. */
interface RunV1 extends Omit<OfflineRun, 'images' | 'signed'> {
	images: string[];
}

/** The v1 → v2 migration under test: image ids become objects, and every run gains an empty `signed` list. */
const toV2: Migration = async (tx) => {
	for (const [key, run] of await tx.range<RunV1>(['run'])) {
		const images = run.images.map((id) => ({ id, sha256: '' }));
		tx.put(key, { ...run, images, signed: [] });
	}
};

async function plantV1(dbName: string): Promise<void> {
	const v1 = await openOfflineStore({ dbName, schemaVersion: 1, migrations: { 1: MIGRATIONS[1] } });
	const { images: _images, signed: _signed, ...base } = makeRun('run-7');
	const old: RunV1 = { ...base, images: ['img-1', 'img-2'] };
	await v1.set(KEYS.run('run-7'), old);
	await v1.set(KEYS.outbox(1), { seq: 1, untouched: true });
	await v1.close();
}

describe('schema migration', () => {
	it('migrates real v1 data to v2 on open and stores the new version', async () => {
		const dbName = freshDbName('mig');
		await plantV1(dbName);
		const v2 = await openOfflineStore({ dbName, schemaVersion: 2, migrations: { ...MIGRATIONS, 2: toV2 } });
		expect(await v2.get(KEYS.schema())).toBe(2);
		const run = await getRun(v2, 'run-7');
		expect(run?.images).toEqual([
			{ id: 'img-1', sha256: '' },
			{ id: 'img-2', sha256: '' }
		]);
		expect(run?.signed).toEqual([]);
		expect(run?.jobNumber).toBe('KL-24-0117');
		expect(await v2.get(KEYS.outbox(1))).toEqual({ seq: 1, untouched: true });
		await v2.close();

		// Opening again at v2 runs nothing: a migration that would throw is never called.
		const again = await openOfflineStore({
			dbName,
			schemaVersion: 2,
			migrations: {
				...MIGRATIONS,
				2: async () => {
					throw new Error('must not run twice');
				}
			}
		});
		expect(await again.get(KEYS.schema())).toBe(2);
		await again.close();
	});

	it("the app's own migration to 2 drops runs without a runner view and keeps the outbox", async () => {
		const dbName = freshDbName('mig-app');
		const v1 = await openOfflineStore({ dbName, schemaVersion: 1, migrations: { 1: MIGRATIONS[1] } });
		await v1.set(KEYS.run('run-old'), makeRun('run-old'));
		await v1.set(KEYS.run('run-new'), { ...makeRun('run-new'), view: { kept: true } });
		await v1.set(KEYS.outbox(1), { seq: 1, untouched: true });
		await v1.close();
		const v2 = await openOfflineStore({ dbName });
		expect(await v2.get(KEYS.schema())).toBe(SCHEMA_VERSION);
		expect(await getRun(v2, 'run-old')).toBeUndefined();
		expect((await getRun(v2, 'run-new'))?.view).toEqual({ kept: true });
		expect(await v2.get(KEYS.outbox(1))).toEqual({ seq: 1, untouched: true });
		await v2.close();
	});

	it('leaves v1 data and version untouched when a migration fails halfway', async () => {
		const dbName = freshDbName('mig-fail');
		await plantV1(dbName);
		const failing: Migration = async (tx) => {
			await toV2(tx);
			throw new Error('disk full (simulated)');
		};
		await expect(
			openOfflineStore({ dbName, schemaVersion: 2, migrations: { ...MIGRATIONS, 2: failing } })
		).rejects.toThrow('disk full (simulated)');
		const raw = createStore(dbName);
		expect(await raw.get(KEYS.schema())).toBe(1);
		expect((await raw.get<RunV1>(KEYS.run('run-7')))?.images).toEqual(['img-1', 'img-2']);
		await raw.close();
	});

	it('refuses to open a database newer than the code, with a clear error, and changes nothing', async () => {
		const dbName = freshDbName('too-new');
		await plantV1(dbName);
		const v2 = await openOfflineStore({ dbName, schemaVersion: 2, migrations: { ...MIGRATIONS, 2: toV2 } });
		await v2.close();
		const old = openOfflineStore({ dbName, schemaVersion: 1, migrations: MIGRATIONS });
		await expect(old).rejects.toBeInstanceOf(OfflineStoreTooNewError);
		await expect(old).rejects.toThrow(/schema 2, newer than this page understands \(1\).*Reload the page/);
		const raw = createStore(dbName);
		expect(await raw.get(KEYS.schema())).toBe(2);
		await raw.close();
	});

	it('names the missing step when no migration exists for a version', async () => {
		const store = createStore(freshDbName('gap'));
		await expect(migrate(store, 3, { 1: MIGRATIONS[1] })).rejects.toThrow(
			'No migration of the offline store to schema 2.'
		);
		expect(await store.get(KEYS.schema())).toBeUndefined();
		await store.close();
	});

	it('clears expired in-flight markers left by an earlier page, keeps a live one (another tab may be sending)', async () => {
		const dbName = freshDbName('inflight');
		const t = 1_000_000;
		const first = await openOfflineStore({ dbName, now: t });
		await first.set(KEYS.outbox(1), { seq: 1, inFlight: { at: t - IN_FLIGHT_LEASE_MS, session: first.session } });
		await first.set(KEYS.outbox(2), { seq: 2, inFlight: { at: t - 1000, session: first.session } });
		await first.close();
		const second = await openOfflineStore({ dbName, now: t });
		expect(await second.get(KEYS.outbox(1))).toEqual({ seq: 1 });
		expect(await second.get(KEYS.outbox(2))).toEqual({ seq: 2, inFlight: { at: t - 1000, session: first.session } });
		await second.close();
	});
});

describe('single-transaction writes', () => {
	it('writes nothing when the second put cannot be cloned', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('atomic') });
		const write = store.transact('readwrite', (tx) => {
			tx.put(['meta', 'first'], { ok: true });
			tx.put(['meta', 'second'], { notCloneable: () => 1 });
		});
		await expect(write).rejects.toThrow(/clone/i);
		expect(await store.get(['meta', 'first'])).toBeUndefined();
		expect(await store.get(['meta', 'second'])).toBeUndefined();
		await store.close();
	});

	it('writes nothing when the callback throws after awaiting a read', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('atomic-read') });
		const write = store.transact('readwrite', async (tx) => {
			tx.put(['meta', 'first'], 1);
			await tx.get(['meta', 'first']);
			throw new Error('rule broken');
		});
		await expect(write).rejects.toThrow('rule broken');
		expect(await store.get(['meta', 'first'])).toBeUndefined();
		await store.close();
	});

	it('notifies listeners after a committed write only', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('notify') });
		let calls = 0;
		const off = store.onChange(() => calls++);
		await store.transact('readwrite', (tx) => tx.put(['meta', 'x'], 1));
		await store.transact('readwrite', () => Promise.reject(new Error('no'))).catch(() => {});
		await store.transact('readonly', (tx) => tx.get(['meta', 'x']));
		off();
		await store.set(['meta', 'y'], 2);
		expect(calls).toBe(1);
		await store.close();
	});

	// Why transact() exists: idb-keyval's setMany queues puts in a plain loop, so a put that throws synchronously
	// leaves the earlier puts queued and the transaction commits them. (Observed under fake-indexeddb; the
	// IndexedDB spec behaves the same: an exception outside a request callback does not abort a transaction.)
	it('shows that plain idb-keyval setMany would keep the first put', async () => {
		const store = createStore(freshDbName('keyval'));
		await expect(
			keyvalSetMany(
				[
					[['meta', 'first'], 1],
					[['meta', 'second'], () => 2]
				],
				store.use
			)
		).rejects.toThrow(/clone/i);
		await new Promise((r) => setTimeout(r, 10));
		expect(await store.get(['meta', 'first'])).toBe(1);
		await store.close();
	});
});
