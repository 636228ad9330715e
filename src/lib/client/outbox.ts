/**
 * The outbox of signed records and their photos, kept in the offline store until the server has answered for each.
 *
 * - Order is strict FIFO by a sequence number handed out in the enqueue transaction (key `['outbox', seq]`), so
 *   IndexedDB's key order is the send order, across restarts, even if the device clock is set back.
 * - A record leaves only on the server's answer: `accepted` or `duplicate` (the server already had that id).
 *   `refused` moves it to the refused list with the reason; nothing is dropped silently.
 * - Photos go after their record: a photo is sent only once its record was accepted, and is retried until stored.
 */
import type { RecordDraft } from '$lib/ledger/record';
import { isUuidV7 } from '$lib/ledger/uuid-v7';
import { nextRetryDelay, type Random } from './backoff';
import {
	KEYS,
	inFlightHolds,
	type EntryInProgress,
	type OfflineRun,
	type OfflineStore,
	type StoreTx
} from './offline-store';

export { nextRetryDelay, seededRandom, RETRY_BASE_MS, RETRY_CAP_MS, type Random } from './backoff';
export { IN_FLIGHT_LEASE_MS } from './offline-store';

/** A tablet that has held unsynced records longer than this shows a warning: 8 h (issue 7). */
export const STALE_AFTER_MS = 8 * 60 * 60_000;
/** A record whose device clock differed from the server's by more than this is flagged: 5 min (issue 7). */
export const CLOCK_SKEW_LIMIT_MS = 5 * 60_000;

/**
 * A signed record as the tablet sends it: the ledger's {@link RecordDraft} (`id` is the client's uuid v7, the
 * server's idempotency key; the server assigns the chain position) plus the device's signing time and signature.
 */
export interface OutboxRecord extends RecordDraft {
	/** Device time (ms) of signing. */
	signedAt: number;
	/** The device's signature over the canonical record, once enrolled tablets exist. */
	signature?: { deviceId: string; value: string };
	/** Signed while the server could not be reached: the PIN was checked on the tablet against its verifier. */
	signedOffline?: boolean;
	/** The signer's sealed offline grant (offline records only); the server checks it on sync. */
	offlineGrant?: string;
}

/** A record waiting in the outbox. */
export interface OutboxItem {
	seq: number;
	record: OutboxRecord;
	/** Device time (ms) it was enqueued. */
	enqueuedAt: number;
	/** How many times it was handed to the server. */
	attempts: number;
	lastAttemptAt?: number;
	/** Set while a batch holding it is at the server; cleared on the answer or a failure, expires after the lease. */
	inFlight?: { at: number; session: string };
	/** Server time − device time (ms) as last measured while this record waited (or when it was answered). */
	clockOffsetMs?: number;
}

/** A record the server refused; stays on the tablet, with the reason, until someone deals with it. */
export interface RefusedItem {
	seq: number;
	record: OutboxRecord;
	enqueuedAt: number;
	refusedAt: number;
	reason: string;
	clockOffsetMs?: number;
}

/** A photo to upload after its record. */
export interface PhotoItem {
	seq: number;
	id: string;
	recordId: string;
	runId: string;
	sha256: string;
	blob: Blob;
	enqueuedAt: number;
	attempts: number;
	/** Device time its record was accepted (or answered duplicate): from then on it may be sent. */
	recordStoredAt?: number;
	nextAttemptAt?: number;
	lastError?: string;
	/** Set when the server refused the photo itself; it stays visible like a refused record. */
	refused?: { at: number; reason: string };
}

/** A photo handed to {@link enqueue} with its record. */
export interface PhotoInput {
	id: string;
	sha256: string;
	blob: Blob;
}

/** Sync bookkeeping kept under `['meta', 'sync']`. */
export interface SyncMeta {
	lastSuccessAt?: number;
	lastAttemptAt?: number;
	/** Consecutive failed exchanges; drives {@link nextRetryDelay}. */
	failures: number;
	nextAttemptAt?: number;
	lastError?: string;
	/** Server time − device time (ms), last measured. */
	clockOffsetMs?: number;
}

/** The server's answer for one record. */
export interface RecordAnswer {
	id: string;
	status: 'accepted' | 'duplicate' | 'refused';
	reason?: string;
}

/** What {@link enqueue} writes besides the record, in the same transaction. */
export interface EnqueueOptions {
	now: number;
	photos?: PhotoInput[];
	/** Entries to store with the record (typically the signed values, now carrying `recordId`). */
	entries?: EntryInProgress[];
	/** Read-modify-write of the record's run inside the transaction; the run must be on this tablet. */
	updateRun?: (run: OfflineRun) => OfflineRun;
}

const REFUSED_WITHOUT_REASON = 'The server refused this record without giving a reason.';

/** The sync bookkeeping, with defaults for a fresh tablet. */
export async function readSyncMeta(store: OfflineStore): Promise<SyncMeta> {
	return (await store.get<SyncMeta>(KEYS.sync())) ?? { failures: 0 };
}

/** Writes the sync bookkeeping through `change` in one transaction. */
export async function updateSyncMeta(store: OfflineStore, change: (meta: SyncMeta) => SyncMeta): Promise<SyncMeta> {
	return store.transact('readwrite', async (tx) => {
		const next = change((await tx.get<SyncMeta>(KEYS.sync())) ?? { failures: 0 });
		tx.put(KEYS.sync(), next);
		return next;
	});
}

/**
 * Puts a signed record in the outbox together with its photos and the run state it changes, in ONE IndexedDB
 * transaction: after a crash either all of it is on the tablet or none of it is. The record goes in first; if any
 * later write fails (a value that cannot be cloned, a missing run, quota) the transaction aborts and the error is
 * rethrown — the caller must then not tell the technician the step is signed. The id must be a uuid v7
 * (`uuidv7()` of `$lib/ledger`).
 */
export async function enqueue(store: OfflineStore, record: OutboxRecord, options: EnqueueOptions): Promise<OutboxItem> {
	const { now } = options;
	if (!isUuidV7(record.id)) throw new Error(`Record id ${record.id} is not a uuid v7; the record was not stored.`);
	return store.transact('readwrite', async (tx) => {
		const meta = await tx.get<SyncMeta>(KEYS.sync());
		let seq = (await tx.get<number>(KEYS.seq())) ?? 0;
		const item: OutboxItem = { seq: ++seq, record, enqueuedAt: now, attempts: 0 };
		if (meta?.clockOffsetMs !== undefined) item.clockOffsetMs = meta.clockOffsetMs;
		tx.put(KEYS.outbox(item.seq), item);
		for (const photo of options.photos ?? []) {
			const queued: PhotoItem = {
				...photo,
				seq: ++seq,
				recordId: record.id,
				runId: record.runId,
				enqueuedAt: now,
				attempts: 0
			};
			tx.put(KEYS.photo(queued.seq), queued);
		}
		tx.put(KEYS.seq(), seq);
		for (const entry of options.entries ?? []) {
			tx.put(KEYS.entry(entry.runId, entry.stepId, entry.checkpointId), entry);
		}
		if (options.updateRun) {
			const run = await tx.get<OfflineRun>(KEYS.run(record.runId));
			if (!run) throw new Error(`Run ${record.runId} is not on this tablet; the record was not stored.`);
			tx.put(KEYS.run(record.runId), options.updateRun(run));
		}
		return item;
	});
}

/**
 * Queues the photos of a record the server has ALREADY stored (it went online, but its photos were taken while the
 * server was unreachable and are only on this tablet): they may upload at once, after their record as always.
 * One transaction; the sequence numbers continue the outbox's.
 */
export async function queuePhotosOfStoredRecord(
	store: OfflineStore,
	record: Pick<OutboxRecord, 'id' | 'runId'>,
	photos: PhotoInput[],
	now: number
): Promise<PhotoItem[]> {
	if (photos.length === 0) return [];
	return store.transact('readwrite', async (tx) => {
		let seq = (await tx.get<number>(KEYS.seq())) ?? 0;
		const queued = photos.map((photo): PhotoItem => ({
			...photo,
			seq: ++seq,
			recordId: record.id,
			runId: record.runId,
			enqueuedAt: now,
			attempts: 0,
			recordStoredAt: now
		}));
		for (const q of queued) tx.put(KEYS.photo(q.seq), q);
		tx.put(KEYS.seq(), seq);
		return queued;
	});
}

async function outboxIn(tx: StoreTx): Promise<OutboxItem[]> {
	return (await tx.range<OutboxItem>(['outbox'])).map(([, item]) => item);
}

/** Every waiting record, in send order. */
export async function listOutbox(store: OfflineStore): Promise<OutboxItem[]> {
	return store.transact('readonly', outboxIn);
}

/** Every refused record, oldest first. */
export async function listRefused(store: OfflineStore): Promise<RefusedItem[]> {
	const items = await store.transact('readonly', (tx) => tx.range<RefusedItem>(['refused']));
	return items.map(([, item]) => item).sort((a, b) => a.seq - b.seq);
}

/** Every photo not yet stored on the server (waiting for its record, retrying, or refused), in order. */
export async function listPhotos(store: OfflineStore): Promise<PhotoItem[]> {
	const items = await store.transact('readonly', (tx) => tx.range<PhotoItem>(['photo']));
	return items.map(([, item]) => item);
}

/**
 * The head of the queue: the first `max` records not held by a live in-flight marker, all of one run (the submit
 * route is per run), in FIFO order. A record of another run ends the batch, so no record overtakes an older one.
 */
export function selectBatch(items: OutboxItem[], max: number, now: number): OutboxItem[] {
	const free = items.filter((i) => !inFlightHolds(i.inFlight, now));
	const runId = free[0]?.record.runId;
	const batch: OutboxItem[] = [];
	for (const item of free) {
		if (batch.length >= max || item.record.runId !== runId) break;
		batch.push(item);
	}
	return batch;
}

/** The records the next exchange would send (read only). */
export async function nextBatch(store: OfflineStore, max: number, now: number = Date.now()): Promise<OutboxItem[]> {
	return selectBatch(await listOutbox(store), max, now);
}

/**
 * Takes the next batch for sending: in one transaction, selects it and marks each record in flight (counting the
 * attempt), so a second caller on the same database skips them.
 */
export async function claimBatch(store: OfflineStore, max: number, now: number): Promise<OutboxItem[]> {
	return store.transact('readwrite', async (tx) => {
		const batch = selectBatch(await outboxIn(tx), max, now).map((item) => ({
			...item,
			attempts: item.attempts + 1,
			lastAttemptAt: now,
			inFlight: { at: now, session: store.session }
		}));
		for (const item of batch) tx.put(KEYS.outbox(item.seq), item);
		return batch;
	});
}

/** Clears the in-flight marker of the given records (after a failed exchange); they keep their place. */
export async function releaseBatch(store: OfflineStore, ids: Iterable<string>): Promise<void> {
	const wanted = new Set(ids);
	await store.transact('readwrite', async (tx) => {
		for (const item of await outboxIn(tx)) {
			if (!wanted.has(item.record.id) || !item.inFlight) continue;
			const { inFlight: _gone, ...rest } = item;
			tx.put(KEYS.outbox(item.seq), rest);
		}
	});
}

/** What {@link applyAnswers} did. `unknown` lists answers for ids that were not waiting (ignored). */
export interface AppliedAnswers {
	accepted: string[];
	duplicate: string[];
	refused: string[];
	unknown: string[];
}

/** Options of {@link applyAnswers}. */
export interface ApplyOptions {
	now: number;
	/** Server − device time measured on this exchange; stored on every record it touches. */
	clockOffsetMs?: number;
	/** Records whose in-flight marker to clear even without an answer (the rest of the batch). */
	release?: Iterable<string>;
}

/**
 * Applies the server's per-record answers in one transaction: `accepted` and `duplicate` leave the outbox (and
 * release their photos for upload); `refused` moves to the refused list with the reason. The first answer for an
 * id wins. Records without an answer stay where they are.
 */
export async function applyAnswers(
	store: OfflineStore,
	answers: RecordAnswer[],
	options: ApplyOptions
): Promise<AppliedAnswers> {
	const { now, clockOffsetMs } = options;
	const release = new Set(options.release ?? []);
	return store.transact('readwrite', async (tx) => {
		const done: AppliedAnswers = { accepted: [], duplicate: [], refused: [], unknown: [] };
		const waiting = new Map((await outboxIn(tx)).map((item) => [item.record.id, item]));
		const stored = new Set<string>();
		for (const answer of answers) {
			const item = waiting.get(answer.id);
			if (!item) {
				done.unknown.push(answer.id);
				continue;
			}
			waiting.delete(answer.id);
			const offset = clockOffsetMs ?? item.clockOffsetMs;
			tx.del(KEYS.outbox(item.seq));
			if (answer.status === 'refused') {
				const refused: RefusedItem = {
					seq: item.seq,
					record: item.record,
					enqueuedAt: item.enqueuedAt,
					refusedAt: now,
					reason: answer.reason?.trim() || REFUSED_WITHOUT_REASON
				};
				if (offset !== undefined) refused.clockOffsetMs = offset;
				tx.put(KEYS.refused(item.record.id), refused);
				done.refused.push(answer.id);
			} else {
				stored.add(answer.id);
				done[answer.status].push(answer.id);
			}
		}
		for (const item of waiting.values()) {
			const touched = release.has(item.record.id) && item.inFlight;
			if (!touched && clockOffsetMs === undefined) continue;
			const { inFlight, ...rest } = item;
			const next: OutboxItem = touched || !inFlight ? rest : { ...rest, inFlight };
			if (clockOffsetMs !== undefined) next.clockOffsetMs = clockOffsetMs;
			tx.put(KEYS.outbox(item.seq), next);
		}
		if (stored.size > 0) {
			for (const [key, photo] of await tx.range<PhotoItem>(['photo'])) {
				if (stored.has(photo.recordId) && photo.recordStoredAt === undefined) {
					tx.put(key, { ...photo, recordStoredAt: now });
				}
			}
		}
		return done;
	});
}

/**
 * "Dealt with": someone has read a refused record's reason and taken it up (the server holds a copy for the
 * quality lead), so the tablet stops listing it. Its photos still on the tablet go with it. Returns false when no
 * such refused record was here.
 */
export async function clearRefused(store: OfflineStore, recordId: string): Promise<boolean> {
	return store.transact('readwrite', async (tx) => {
		if (!(await tx.get<RefusedItem>(KEYS.refused(recordId)))) return false;
		tx.del(KEYS.refused(recordId));
		for (const [key, photo] of await tx.range<PhotoItem>(['photo'])) if (photo.recordId === recordId) tx.del(key);
		return true;
	});
}

/** Photos whose record is stored, not refused, and whose retry time has come (all of them when `force`). */
export async function photosDue(store: OfflineStore, now: number, force = false): Promise<PhotoItem[]> {
	return (await listPhotos(store)).filter(
		(p) => p.recordStoredAt !== undefined && !p.refused && (force || (p.nextAttemptAt ?? 0) <= now)
	);
}

/** The server's answer for one photo upload. */
export type PhotoAnswer = { status: 'stored' } | { status: 'refused'; reason?: string };

/**
 * Records the outcome of one photo upload: `stored` removes it; `refused` keeps it, marked, with the reason;
 * an `Error` (network, server down) counts an attempt and schedules the retry with {@link nextRetryDelay}.
 */
export async function settlePhoto(
	store: OfflineStore,
	photo: PhotoItem,
	outcome: PhotoAnswer | Error,
	now: number,
	random: Random
): Promise<void> {
	await store.transact('readwrite', async (tx) => {
		const current = await tx.get<PhotoItem>(KEYS.photo(photo.seq));
		if (!current) return;
		if (outcome instanceof Error) {
			const attempts = current.attempts + 1;
			tx.put(KEYS.photo(photo.seq), {
				...current,
				attempts,
				nextAttemptAt: now + nextRetryDelay(attempts, random),
				lastError: outcome.message
			});
		} else if (outcome.status === 'stored') {
			tx.del(KEYS.photo(photo.seq));
		} else {
			const reason = outcome.reason?.trim() || 'The server refused this photo without giving a reason.';
			tx.put(KEYS.photo(photo.seq), { ...current, attempts: current.attempts + 1, refused: { at: now, reason } });
		}
	});
}

/** Everything the indicator is computed from, read in one transaction. */
export interface OutboxSnapshot {
	waiting: OutboxItem[];
	refused: RefusedItem[];
	photos: PhotoItem[];
	meta: SyncMeta;
}

/** Reads an {@link OutboxSnapshot} (one consistent view). */
export async function readSnapshot(store: OfflineStore): Promise<OutboxSnapshot> {
	return store.transact('readonly', async (tx) => {
		const [waiting, refused, photos, meta] = await Promise.all([
			outboxIn(tx),
			tx.range<RefusedItem>(['refused']),
			tx.range<PhotoItem>(['photo']),
			tx.get<SyncMeta>(KEYS.sync())
		]);
		return {
			waiting,
			refused: refused.map(([, r]) => r).sort((a, b) => a.seq - b.seq),
			photos: photos.map(([, p]) => p),
			meta: meta ?? { failures: 0 }
		};
	});
}

/** One line of the tablet's sync list. */
export interface RecordState {
	id: string;
	runId: string;
	kind: string;
	status: 'waiting' | 'sending' | 'refused';
	/** Device time it was enqueued. */
	since: number;
	reason?: string;
	/** The device clock was more than {@link CLOCK_SKEW_LIMIT_MS} off the server's. */
	clockSkew: boolean;
}

/** The always-visible sync state. */
export interface SyncState {
	/** Records waiting to be sent (including those being sent). */
	waiting: number;
	/** Photos not yet stored (waiting for their record or retrying), refused ones excluded. */
	photosWaiting: number;
	/** Refused records and photos, kept on the tablet until dealt with. */
	refused: number;
	lastSuccessAt: number | null;
	/** Enqueue time of the oldest waiting record or photo. */
	oldestWaitingAt: number | null;
	/** True when something has waited more than {@link STALE_AFTER_MS}. */
	staleWarning: boolean;
	nextAttemptAt: number | null;
	lastError: string | null;
	clockOffsetMs: number | null;
	/** Waiting records in send order, then refused ones. */
	records: RecordState[];
}

/** True when a measured offset is beyond {@link CLOCK_SKEW_LIMIT_MS}. */
export function isClockSkewed(clockOffsetMs: number | undefined): boolean {
	return clockOffsetMs !== undefined && Math.abs(clockOffsetMs) > CLOCK_SKEW_LIMIT_MS;
}

/** The indicator's state as a pure function of what is stored and the current device time. */
export function computeSyncState(snapshot: OutboxSnapshot, now: number): SyncState {
	const { waiting, refused, photos, meta } = snapshot;
	const pendingPhotos = photos.filter((p) => !p.refused);
	const times = [...waiting.map((w) => w.enqueuedAt), ...pendingPhotos.map((p) => p.enqueuedAt)];
	const oldestWaitingAt = times.length > 0 ? Math.min(...times) : null;
	return {
		waiting: waiting.length,
		photosWaiting: pendingPhotos.length,
		refused: refused.length + (photos.length - pendingPhotos.length),
		lastSuccessAt: meta.lastSuccessAt ?? null,
		oldestWaitingAt,
		staleWarning: oldestWaitingAt !== null && now - oldestWaitingAt > STALE_AFTER_MS,
		nextAttemptAt: meta.nextAttemptAt ?? null,
		lastError: meta.lastError ?? null,
		clockOffsetMs: meta.clockOffsetMs ?? null,
		records: [
			...waiting.map((w): RecordState => ({
				id: w.record.id,
				runId: w.record.runId,
				kind: w.record.kind,
				status: w.inFlight ? 'sending' : 'waiting',
				since: w.enqueuedAt,
				clockSkew: isClockSkewed(w.clockOffsetMs)
			})),
			...refused.map((r): RecordState => ({
				id: r.record.id,
				runId: r.record.runId,
				kind: r.record.kind,
				status: 'refused',
				since: r.enqueuedAt,
				reason: r.reason,
				clockSkew: isClockSkewed(r.clockOffsetMs)
			}))
		]
	};
}
