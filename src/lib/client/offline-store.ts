/**
 * The tablet's offline store: one IndexedDB object store reached through `idb-keyval`, holding plain, versioned
 * objects under array keys whose first element names the kind (`['run', runId]`, `['outbox', seq]`, …).
 *
 * Everything lives in ONE object store on purpose: an IndexedDB transaction can only be as wide as the stores it
 * names, and idb-keyval opens one store per `createStore`. Keeping the outbox, the runs and the entries side by side
 * is what lets a signed record and the run state it changes be written by one transaction ({@link OfflineStore.transact}).
 *
 * Browser-only (also runs under fake-indexeddb in tests). Imports nothing from the server.
 */
import {
	createStore as createKeyvalStore,
	delMany as keyvalDelMany,
	entries as keyvalEntries,
	get as keyvalGet,
	getMany as keyvalGetMany,
	set as keyvalSet,
	setMany as keyvalSetMany,
	update as keyvalUpdate,
	type UseStore
} from 'idb-keyval';
import type { Procedure } from '$lib/procedure';
import type { OfflineRunnerView } from '$lib/server/services/offline.service';

/** The schema this code reads and writes. Raise it by one with each change of shape and add a {@link Migration}. */
export const SCHEMA_VERSION = 2;

/** Default database and object-store names on the tablet. */
export const DEFAULT_DB_NAME = 'benchstamp-offline';
/** @see DEFAULT_DB_NAME */
export const DEFAULT_STORE_NAME = 'kv';

/** A value that survives JSON and structured cloning alike. */
export type JsonValue = string | number | boolean | null | JsonValue[] | { [key: string]: JsonValue };

/** A key in the store: the kind first, then its identifying parts. */
export type StoreKey = (string | number)[];

/** The kinds of object in the store, the first element of every key. */
export type StoreKind = 'meta' | 'run' | 'entry' | 'outbox' | 'refused' | 'photo' | 'signer' | 'kept' | 'pinlock';

/** Key builders: the one place the key layout is written down. */
export const KEYS = {
	/** The schema version number this database was last migrated to. */
	schema: (): StoreKey => ['meta', 'schema'],
	/** {@link import('./outbox').SyncMeta}: last success, retry schedule, measured clock offset. */
	sync: (): StoreKey => ['meta', 'sync'],
	/** The last outbox sequence number handed out (FIFO order, survives restarts). */
	seq: (): StoreKey => ['meta', 'seq'],
	run: (runId: string): StoreKey => ['run', runId],
	entry: (runId: string, stepId: string, checkpointId: string): StoreKey => ['entry', runId, stepId, checkpointId],
	outbox: (seq: number): StoreKey => ['outbox', seq],
	refused: (id: string): StoreKey => ['refused', id],
	photo: (seq: number): StoreKey => ['photo', seq],
	/** {@link import('./offline-pin').OfflineSigner}: a signer's PIN verifier and server grant on this tablet. */
	signer: (userId: string): StoreKey => ['signer', userId],
	/** A photo taken on this tablet that no record names yet (see offline-photo.ts); moves to `photo` on enqueue. */
	kept: (photoId: string): StoreKey => ['kept', photoId],
	/** `LockState` of `$lib/signing/pin-lockout`: wrong PINs typed offline for one signer on this tablet. */
	pinLock: (userId: string): StoreKey => ['pinlock', userId]
} as const;

/** One image of a pinned procedure version; `blob` is absent until it has been fetched onto the tablet. */
export interface OfflineImage {
	id: string;
	sha256: string;
	blob?: Blob;
}

/** A step sign-off as the run on this tablet knows it; two for one step (two tablets) are both kept. */
export interface SignedStep {
	stepId: string;
	recordId: string;
	signedAt: number;
}

/** A run taken offline: the pinned procedure version (source, parsed model, images) and its progress here. */
export interface OfflineRun {
	runId: string;
	jobNumber: string;
	procedureVersionId: string;
	/** sha256 of the normalised source (`contentHash` of `$lib/procedure`), checked against the server's pin. */
	contentHash: string;
	source: string;
	model: Procedure;
	images: OfflineImage[];
	/** Device time (ms) the run was made available on this tablet. */
	takenAt: number;
	/** Sign-offs made on this tablet, in order; written in the same transaction as their outbox record. */
	signed: SignedStep[];
	/** The runner screen's data as the server last gave it (schema 2); the runner renders from this. */
	view?: OfflineRunnerView;
}

/** What a technician has typed for one checkpoint and not yet signed (or signed, with the record's id). */
export interface EntryInProgress {
	runId: string;
	stepId: string;
	checkpointId: string;
	value: JsonValue;
	updatedAt: number;
	/** Set when the entry went into a signed record. */
	recordId?: string;
}

/**
 * A transaction over the store. `put` and `del` queue a request at once and throw synchronously when the value
 * cannot be stored (e.g. a `DataCloneError`); {@link OfflineStore.transact} then aborts the whole transaction.
 * Inside a transaction, await only these methods: awaiting anything else (a fetch, a timer) lets IndexedDB
 * commit the transaction early and the next request fails with `TransactionInactiveError`.
 */
export interface StoreTx {
	get<T>(key: StoreKey): Promise<T | undefined>;
	put(key: StoreKey, value: unknown): void;
	del(key: StoreKey): void;
	/** All `[key, value]` pairs whose key starts with `prefix` (e.g. `['entry', runId]`), in key order. */
	range<T>(prefix: [StoreKind, ...(string | number)[]]): Promise<[StoreKey, T][]>;
}

/** A migration from schema `n - 1` to `n`, stored under key `n`; runs inside the one open transaction. */
export type Migration = (tx: StoreTx) => Promise<void>;

/**
 * The migrations of this code, one per schema version. Version 1 is the first shape: a fresh database has nothing
 * to convert. Each later entry converts the data written by the version before it.
 */
export const MIGRATIONS: Record<number, Migration> = {
	1: async () => {},
	// Version 2 keeps the runner's whole view with each run. A version-1 run has none and is dropped: it is fetched
	// again when the run is next made available. Entries, the outbox and refused records are kept as they are.
	2: async (tx) => {
		for (const [key, run] of await tx.range<Partial<OfflineRun>>(['run'])) if (!run.view) tx.del(key);
	}
};

/** Thrown by {@link openOfflineStore} when the database was written by newer code than this page. */
export class OfflineStoreTooNewError extends Error {
	constructor(
		readonly found: number,
		readonly supported: number
	) {
		super(
			`The offline store on this tablet has schema ${found}, newer than this page understands (${supported}). ` +
				'Nothing was changed. Reload the page to get the current version of Benchstamp.'
		);
		this.name = 'OfflineStoreTooNewError';
	}
}

/** A typed handle on one idb-keyval store, plus single-transaction writes and change notification. */
export interface OfflineStore {
	readonly dbName: string;
	readonly storeName: string;
	/** A random id of this handle (one per page load), written into in-flight markers. */
	readonly session: string;
	/** idb-keyval's raw store function: `use(mode, objectStore => …)` runs the callback in one transaction. */
	readonly use: UseStore;
	get<T>(key: StoreKey): Promise<T | undefined>;
	set(key: StoreKey, value: unknown): Promise<void>;
	update<T>(key: StoreKey, updater: (old: T | undefined) => T): Promise<void>;
	getMany<T>(keys: StoreKey[]): Promise<(T | undefined)[]>;
	setMany(entries: [StoreKey, unknown][]): Promise<void>;
	entries<T>(): Promise<[StoreKey, T][]>;
	delMany(keys: StoreKey[]): Promise<void>;
	/**
	 * Runs `fn` in ONE IndexedDB transaction: every `put`/`del` it makes is committed together or not at all. A
	 * throw (including a value that cannot be cloned) aborts the transaction and rejects with that error.
	 */
	transact<T>(mode: IDBTransactionMode, fn: (tx: StoreTx) => Promise<T> | T): Promise<T>;
	/** Calls `listener` after every committed write made through this handle; returns the unsubscribe function. */
	onChange(listener: () => void): () => void;
	/** Closes the connection; the handle cannot be used afterwards (open a new one, as a page reload would). */
	close(): Promise<void>;
}

function randomSession(): string {
	const bytes = crypto.getRandomValues(new Uint8Array(8));
	return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

/** Resolves when the transaction commits; rejects when it aborts (with its error, or a plain one on `abort()`). */
function committed(tx: IDBTransaction): Promise<void> {
	const done = new Promise<void>((resolve, reject) => {
		tx.oncomplete = () => resolve();
		tx.onabort = tx.onerror = () => reject(tx.error ?? new Error('The offline store transaction was aborted.'));
	});
	done.catch(() => {}); // observed later; keeps an early abort from counting as unhandled
	return done;
}

function request<T>(req: IDBRequest<T>): Promise<T> {
	return new Promise((resolve, reject) => {
		req.onsuccess = () => resolve(req.result);
		req.onerror = () => reject(req.error);
	});
}

/** Keys `[...prefix, …]`: from `prefix` up to `[...prefix, []]` (an array sorts above every number and string). */
function prefixRange(prefix: StoreKey): IDBKeyRange {
	return IDBKeyRange.bound(prefix, [...prefix, []]);
}

function txOver(os: IDBObjectStore): StoreTx {
	return {
		get: <T>(key: StoreKey) => request(os.get(key)) as Promise<T | undefined>,
		put: (key, value) => void os.put(value, key),
		del: (key) => void os.delete(key),
		range: async <T>(prefix: StoreKey) => {
			const range = prefixRange(prefix);
			const [keys, values] = await Promise.all([request(os.getAllKeys(range)), request(os.getAll(range))]);
			return keys.map((k, i) => [k as StoreKey, values[i] as T]);
		}
	};
}

/**
 * A typed handle over `idb-keyval`'s `createStore(dbName, storeName)`. It does not migrate: use
 * {@link openOfflineStore} in the app; this is the building block (and what migration tests use to plant old data).
 */
export function createStore(dbName = DEFAULT_DB_NAME, storeName = DEFAULT_STORE_NAME): OfflineStore {
	const use = createKeyvalStore(dbName, storeName);
	const listeners = new Set<() => void>();
	let closed = false;
	const live: UseStore = (mode, callback) => {
		if (closed) return Promise.reject(new Error(`The offline store ${dbName} is closed.`));
		return use(mode, callback);
	};
	const changed = <T>(p: Promise<T>) =>
		p.then((v) => {
			for (const l of listeners) l();
			return v;
		});
	return {
		dbName,
		storeName,
		session: randomSession(),
		use: live,
		get: (key) => keyvalGet(key, live),
		set: (key, value) => changed(keyvalSet(key, value, live)),
		update: (key, updater) => changed(keyvalUpdate(key, updater, live)),
		getMany: (keys) => keyvalGetMany(keys, live),
		setMany: (entries) => changed(keyvalSetMany(entries, live)),
		entries: () => keyvalEntries(live),
		delMany: (keys) => changed(keyvalDelMany(keys, live)),
		transact: <T>(mode: IDBTransactionMode, fn: (tx: StoreTx) => Promise<T> | T) => {
			const run = live(mode, async (os) => {
				const done = committed(os.transaction);
				let result: T;
				try {
					result = await fn(txOver(os));
				} catch (error) {
					try {
						os.transaction.abort();
					} catch {
						// already finished or aborted by IndexedDB itself
					}
					throw error;
				}
				await done;
				return result;
			});
			return mode === 'readwrite' ? changed(run) : run;
		},
		onChange: (listener) => {
			listeners.add(listener);
			return () => listeners.delete(listener);
		},
		close: async () => {
			if (closed) return;
			await use('readonly', (os) => os.transaction.db.close());
			closed = true;
			listeners.clear();
		}
	};
}

/** Options of {@link openOfflineStore}; the defaults are the app's. Tests pass their own to migrate old shapes. */
export interface OpenOptions {
	dbName?: string;
	storeName?: string;
	schemaVersion?: number;
	migrations?: Record<number, Migration>;
	/** Device time used to expire in-flight markers; default `Date.now()`. */
	now?: number;
}

/**
 * Runs the migrations from the stored schema version up to `target`, in order, in ONE transaction together with
 * the new version number: a migration that throws leaves the old data and the old version untouched.
 * A database newer than `target` is refused with {@link OfflineStoreTooNewError} and left as it is.
 * Returns the version found before migrating (0 for a fresh database).
 */
export async function migrate(
	store: OfflineStore,
	target = SCHEMA_VERSION,
	migrations: Record<number, Migration> = MIGRATIONS
): Promise<number> {
	return store.transact('readwrite', async (tx) => {
		const found = (await tx.get<number>(KEYS.schema())) ?? 0;
		if (found > target) throw new OfflineStoreTooNewError(found, target);
		for (let v = found + 1; v <= target; v++) {
			const step = migrations[v];
			if (!step) throw new Error(`No migration of the offline store to schema ${v}.`);
			await step(tx);
		}
		if (found !== target) tx.put(KEYS.schema(), target);
		return found;
	});
}

/**
 * How long an in-flight marker holds its records (60 s). Longer than the HTTP adapter's request timeout (45 s), so
 * an expired marker never belongs to a live request; a marker left by a closed page frees its records after this.
 */
export const IN_FLIGHT_LEASE_MS = 60_000;

/** True while an in-flight marker set at `at` still holds its record (either side: the clock may have been set back). */
export function inFlightHolds(marker: { at: number } | undefined, now: number): boolean {
	return marker !== undefined && Math.abs(now - marker.at) < IN_FLIGHT_LEASE_MS;
}

/**
 * Opens the tablet's store the way the app should: migrate to the current schema, then clear the in-flight
 * markers an earlier page left behind (its request either reached the server — a resend is answered "duplicate" —
 * or it did not). Only expired markers ({@link IN_FLIGHT_LEASE_MS}) are cleared: a fresh one may belong to another
 * tab that is sending right now. Instantiate once per page and share the handle (the sync lock lives on it).
 */
export async function openOfflineStore(options: OpenOptions = {}): Promise<OfflineStore> {
	const store = createStore(options.dbName, options.storeName);
	const now = options.now ?? Date.now();
	try {
		await migrate(store, options.schemaVersion, options.migrations);
		await store.transact('readwrite', async (tx) => {
			for (const [key, item] of await tx.range<{ inFlight?: { at: number } }>(['outbox'])) {
				if (!item.inFlight || inFlightHolds(item.inFlight, now)) continue;
				const { inFlight: _gone, ...rest } = item;
				tx.put(key, rest);
			}
		});
	} catch (error) {
		await store.close().catch(() => {});
		throw error;
	}
	return store;
}

/** Stores (or replaces) a run taken offline. */
export function saveRun(store: OfflineStore, run: OfflineRun): Promise<void> {
	return store.set(KEYS.run(run.runId), run);
}

/** The run if it is on this tablet. */
export function getRun(store: OfflineStore, runId: string): Promise<OfflineRun | undefined> {
	return store.get<OfflineRun>(KEYS.run(runId));
}

/** Every run available on this tablet. */
export async function listRuns(store: OfflineStore): Promise<OfflineRun[]> {
	return (await store.transact('readonly', (tx) => tx.range<OfflineRun>(['run']))).map(([, run]) => run);
}

/** Saves what was typed for one checkpoint (unsigned work survives a closed tablet or a dead battery). */
export function saveEntry(store: OfflineStore, entry: EntryInProgress): Promise<void> {
	return store.set(KEYS.entry(entry.runId, entry.stepId, entry.checkpointId), entry);
}

/** The entries of one run, in step then checkpoint id order. */
export async function entriesOfRun(store: OfflineStore, runId: string): Promise<EntryInProgress[]> {
	const all = await store.transact('readonly', (tx) => tx.range<EntryInProgress>(['entry', runId]));
	return all.map(([, entry]) => entry);
}
