/**
 * Draining the outbox: {@link syncOnce} replays the submit route in FIFO batches and records each answer;
 * {@link syncOnTriggers} runs it on reconnect, on an interval, after a retry delay and on demand.
 *
 * A record is never sent twice at the same time: an in-memory lock on the store handle stops a second `syncOnce`
 * on the same page, and the persisted in-flight marker ({@link claimBatch}) makes any other handle skip records
 * already at the server. A record may be sent again after a failure whose answer was lost; the server answers
 * `duplicate` for an id it already has, which removes it here like `accepted`.
 */
import { nextRetryDelay, seededRandom, type Random } from './backoff';
import type { OfflineStore } from './offline-store';
import {
	applyAnswers,
	claimBatch,
	photosDue,
	releaseBatch,
	settlePhoto,
	updateSyncMeta,
	readSyncMeta,
	type OutboxRecord,
	type PhotoAnswer,
	type PhotoItem,
	type RecordAnswer
} from './outbox';

/** The server's reply to one batch; `serverTime` (ms) lets the tablet measure its clock offset. */
export interface BatchReply {
	answers: RecordAnswer[];
	serverTime?: number;
}

/** What {@link syncOnce} needs; everything with a side effect outside IndexedDB is injected. */
export interface SyncDeps {
	store: OfflineStore;
	/** Sends one batch (all of one run) and returns the server's answers; throws on a network or server error. */
	fetchBatch: (records: OutboxRecord[]) => Promise<BatchReply>;
	/** Uploads one photo; throws on a network or server error. Without it photos wait. */
	uploadPhoto?: (photo: PhotoItem) => Promise<PhotoAnswer>;
	now: () => number;
	random: Random;
	/** Records per request; default 50. */
	batchSize?: number;
	/** Ignore the retry schedule (reconnect, the "sync now" button). */
	force?: boolean;
}

/** How one {@link syncOnce} ended. */
export interface SyncResult {
	/**
	 * `done`: everything sendable was answered (or nothing waited) · `partial`: the server answered only part of a
	 * batch · `failed`: an exchange failed · `backoff`: not yet time to retry · `busy`: a sync is already running.
	 */
	status: 'done' | 'partial' | 'failed' | 'backoff' | 'busy';
	sent: number;
	accepted: number;
	duplicate: number;
	refused: number;
	photosStored: number;
	photosFailed: number;
	nextAttemptAt?: number;
	error?: string;
}

const running = new WeakSet<OfflineStore>();

function message(error: unknown): string {
	return error instanceof Error ? error.message : String(error);
}

/** Counts a failed exchange and schedules the retry; returns the retry time. */
async function failed(deps: SyncDeps, error: string): Promise<number> {
	const now = deps.now();
	const meta = await updateSyncMeta(deps.store, (m) => {
		const failures = m.failures + 1;
		return {
			...m,
			failures,
			lastAttemptAt: now,
			lastError: error,
			nextAttemptAt: now + nextRetryDelay(failures, deps.random)
		};
	});
	return meta.nextAttemptAt!;
}

/** A finished sync that sent nothing: every count zero. */
export function nothingSent(): SyncResult {
	return { status: 'done', sent: 0, accepted: 0, duplicate: 0, refused: 0, photosStored: 0, photosFailed: 0 };
}

/**
 * Drains the outbox once: claims the next batch, sends it, applies the per-record answers, and repeats until the
 * outbox is empty; then uploads the photos whose records were stored. On a network error the batch is released
 * untouched and the next retry is scheduled with {@link nextRetryDelay}; on a partial answer the answered records
 * are applied, the rest released, and a retry scheduled. Without `force`, does nothing before the scheduled retry.
 */
export async function syncOnce(deps: SyncDeps): Promise<SyncResult> {
	const { store } = deps;
	const result = nothingSent();
	if (running.has(store)) return { ...result, status: 'busy' };
	running.add(store);
	try {
		const meta = await readSyncMeta(store);
		if (!deps.force && meta.nextAttemptAt !== undefined && meta.nextAttemptAt > deps.now()) {
			return { ...result, status: 'backoff', nextAttemptAt: meta.nextAttemptAt };
		}
		for (;;) {
			const batch = await claimBatch(store, deps.batchSize ?? 50, deps.now());
			if (batch.length === 0) break;
			const ids = batch.map((item) => item.record.id);
			result.sent += batch.length;
			let reply: BatchReply;
			try {
				reply = await deps.fetchBatch(batch.map((item) => item.record));
			} catch (error) {
				await releaseBatch(store, ids);
				const nextAttemptAt = await failed(deps, message(error));
				return { ...result, status: 'failed', nextAttemptAt, error: message(error) };
			}
			const now = deps.now();
			const sentIds = new Set(ids);
			const answers = reply.answers.filter((a) => sentIds.has(a.id));
			const clockOffsetMs = reply.serverTime === undefined ? undefined : reply.serverTime - now;
			const applied = await applyAnswers(store, answers, { now, clockOffsetMs, release: ids });
			result.accepted += applied.accepted.length;
			result.duplicate += applied.duplicate.length;
			result.refused += applied.refused.length;
			const answered = applied.accepted.length + applied.duplicate.length + applied.refused.length;
			if (answered < batch.length) {
				const error = `The server answered ${answered} of ${batch.length} records; the rest will be sent again.`;
				if (clockOffsetMs !== undefined) await updateSyncMeta(store, (m) => ({ ...m, clockOffsetMs }));
				const nextAttemptAt = await failed(deps, error);
				return { ...result, status: 'partial', nextAttemptAt, error };
			}
			await updateSyncMeta(store, (m) => {
				const next = { ...m, failures: 0, lastAttemptAt: now, lastSuccessAt: now };
				delete next.nextAttemptAt;
				delete next.lastError;
				if (clockOffsetMs !== undefined) next.clockOffsetMs = clockOffsetMs;
				return next;
			});
		}
		if (deps.uploadPhoto) await uploadPhotos(deps, result);
		return result;
	} finally {
		running.delete(store);
	}
}

/** Uploads due photos one by one; stops at the first failure (the network is likely gone for the rest too). */
async function uploadPhotos(deps: SyncDeps, result: SyncResult): Promise<void> {
	for (const photo of await photosDue(deps.store, deps.now(), deps.force)) {
		let outcome: PhotoAnswer | Error;
		try {
			outcome = await deps.uploadPhoto!(photo);
		} catch (error) {
			outcome = error instanceof Error ? error : new Error(message(error));
		}
		await settlePhoto(deps.store, photo, outcome, deps.now(), deps.random);
		if (outcome instanceof Error) {
			result.photosFailed++;
			result.status = result.status === 'done' ? 'partial' : result.status;
			result.error = outcome.message;
			return;
		}
		if (outcome.status === 'stored') result.photosStored++;
	}
}

/**
 * Why a sync ran. `online`, `demand`, `probe` (the server answered a health probe) and `visible` (the page came back
 * into view and the server answered) ignore the retry schedule; `interval`, `retry` and `start` respect it.
 */
export type SyncReason = 'start' | 'online' | 'interval' | 'retry' | 'demand' | 'probe' | 'visible';

const FORCED: readonly SyncReason[] = ['online', 'demand', 'probe', 'visible'];

/** Largest wait between health probes while records wait after a failed sync: a few seconds. */
export const PROBE_CAP_MS = 5_000;
/** How long a health probe waits for the server. */
export const PROBE_TIMEOUT_MS = 3_000;

/** A cheap check that the server answers: `GET /api/health` (never answered by the service worker), short timeout. */
export function healthProbe(fetchFn: typeof fetch = fetch, timeoutMs = PROBE_TIMEOUT_MS): () => Promise<boolean> {
	return async () => {
		try {
			const res = await fetchFn('/api/health', { cache: 'no-store', signal: AbortSignal.timeout(timeoutMs) });
			return res.ok;
		} catch {
			return false;
		}
	};
}

/** Timer functions, injectable for tests. */
export interface Timers {
	setInterval: (fn: () => void, ms: number) => unknown;
	clearInterval: (handle: unknown) => void;
	setTimeout: (fn: () => void, ms: number) => unknown;
	clearTimeout: (handle: unknown) => void;
}

/** What {@link syncOnTriggers} needs. */
export interface TriggerOptions {
	/** Runs one sync; `force` is true for `online` and `demand`. Usually `(force) => syncOnce({ ...deps, force })`. */
	sync: (force: boolean, reason: SyncReason) => Promise<SyncResult>;
	/** Where `online` fires (the window). */
	events: Pick<EventTarget, 'addEventListener' | 'removeEventListener'>;
	/** Interval between background syncs; default 30 s. */
	intervalMs?: number;
	timers?: Timers;
	now: () => number;
	/** Called with every result (e.g. to refresh the indicator). */
	onResult?: (result: SyncResult, reason: SyncReason) => void;
	/**
	 * A cheap "does the server answer?" ({@link healthProbe}). The Wi-Fi may stay up while the server is gone, so no
	 * `online` event comes when it is back: after a failed sync with records waiting, this is polled with the retry
	 * back-off capped at {@link PROBE_CAP_MS}, and a sync runs as soon as it answers.
	 */
	probe?: () => Promise<boolean>;
	probeCapMs?: number;
	/** Where `visibilitychange` fires and whether the page is visible now (the document). */
	visibility?: { target: Pick<EventTarget, 'addEventListener' | 'removeEventListener'>; visible: () => boolean };
	/** Jitter for the probe delays; default a seeded generator. */
	random?: Random;
}

/** The running trigger wiring. */
export interface SyncTriggers {
	/** On demand ("sync now"); ignores the retry schedule. */
	syncNow(): Promise<SyncResult>;
	/** Removes the listener and timers. */
	stop(): void;
}

const browserTimers: Timers = {
	setInterval: (fn, ms) => setInterval(fn, ms),
	clearInterval: (h) => clearInterval(h as ReturnType<typeof setInterval>),
	setTimeout: (fn, ms) => setTimeout(fn, ms),
	clearTimeout: (h) => clearTimeout(h as ReturnType<typeof setTimeout>)
};

/**
 * Runs `sync` once at start, whenever the `online` event fires, every `intervalMs`, at the scheduled retry time
 * after a failure, and on {@link SyncTriggers.syncNow}. Errors thrown by `sync` itself (not network errors, which
 * `syncOnce` turns into results) are reported through `onResult` as a failed result, never as an unhandled rejection.
 */
export function syncOnTriggers(options: TriggerOptions): SyncTriggers {
	const timers = options.timers ?? browserTimers;
	const random = options.random ?? seededRandom(Date.now());
	let retry: unknown;
	let probeTimer: unknown;
	let probes = 0;
	let stopped = false;
	const stopProbing = () => {
		if (probeTimer !== undefined) timers.clearTimeout(probeTimer);
		probeTimer = undefined;
		probes = 0;
	};
	const scheduleProbe = () => {
		if (stopped || !options.probe || probeTimer !== undefined) return;
		const delay = Math.min(options.probeCapMs ?? PROBE_CAP_MS, nextRetryDelay(++probes, random));
		probeTimer = timers.setTimeout(async () => {
			const up = await options.probe!().catch(() => false);
			probeTimer = undefined;
			if (stopped) return;
			if (up) void run('probe');
			else scheduleProbe();
		}, delay);
	};
	const run = async (reason: SyncReason): Promise<SyncResult> => {
		let result: SyncResult;
		try {
			result = await options.sync(FORCED.includes(reason), reason);
		} catch (error) {
			result = {
				status: 'failed',
				sent: 0,
				accepted: 0,
				duplicate: 0,
				refused: 0,
				photosStored: 0,
				photosFailed: 0,
				error: message(error)
			};
		}
		if (!stopped && result.nextAttemptAt !== undefined && result.status !== 'busy') {
			if (retry !== undefined) timers.clearTimeout(retry);
			const delay = Math.max(0, result.nextAttemptAt - options.now());
			retry = timers.setTimeout(() => {
				retry = undefined;
				void run('retry');
			}, delay);
		}
		// Records wait and the exchange failed: probe until the server answers. A sync the probe itself started
		// that still fails (the server answers health but not the batch) leaves it to the retry schedule.
		const exchangeFailed = result.status === 'failed' || result.status === 'partial';
		if (exchangeFailed && result.sent + result.photosFailed > 0 && reason !== 'probe') scheduleProbe();
		else if (result.status === 'done' || reason === 'probe') stopProbing();
		options.onResult?.(result, reason);
		return result;
	};
	const onOnline = () => void run('online');
	options.events.addEventListener('online', onOnline);
	const onVisible = async () => {
		if (stopped || !options.visibility?.visible()) return;
		if (!options.probe) return void run('interval');
		if (await options.probe().catch(() => false)) {
			stopProbing();
			if (!stopped) void run('visible');
		}
	};
	options.visibility?.target.addEventListener('visibilitychange', onVisible);
	const interval = timers.setInterval(() => void run('interval'), options.intervalMs ?? 30_000);
	void run('start');
	return {
		syncNow: () => run('demand'),
		stop: () => {
			stopped = true;
			stopProbing();
			options.visibility?.target.removeEventListener('visibilitychange', onVisible);
			options.events.removeEventListener('online', onOnline);
			timers.clearInterval(interval);
			if (retry !== undefined) timers.clearTimeout(retry);
		}
	};
}

/** The HTTP adapter gives up on a batch after 45 s, inside the 60 s in-flight lease. */
export const REQUEST_TIMEOUT_MS = 45_000;

/**
 * A `fetchBatch` for the submit route `POST /api/runs/:runId/records` (built by the runner issue), body
 * `{ records }`, reply `{ answers: [{ id, status, reason? }], serverTime? }`. A non-2xx reply or a reply of the
 * wrong shape throws, so the batch stays queued. `serverTime` falls back to the reply's `Date` header.
 */
export function httpFetchBatch(fetchFn: typeof fetch = fetch): (records: OutboxRecord[]) => Promise<BatchReply> {
	return async (records) => {
		const runId = records[0]?.runId;
		if (!runId) return { answers: [] };
		const res = await fetchFn(`/api/runs/${encodeURIComponent(runId)}/records`, {
			method: 'POST',
			headers: { 'content-type': 'application/json', accept: 'application/json' },
			body: JSON.stringify({ records }),
			signal: AbortSignal.timeout(REQUEST_TIMEOUT_MS)
		});
		if (!res.ok) throw new Error(`The server answered ${res.status} to a sync batch.`);
		return parseBatchReply(await res.json(), res.headers.get('date'));
	};
}

/** Checks the shape of a batch reply; throws on anything else (a proxy's error page, a half-written body). */
export function parseBatchReply(body: unknown, dateHeader: string | null = null): BatchReply {
	const answers = (body as { answers?: unknown })?.answers;
	if (!Array.isArray(answers)) throw new Error('The sync reply has no answers list.');
	const parsed: RecordAnswer[] = answers.map((a: unknown) => {
		const { id, status, reason } = (a ?? {}) as Record<string, unknown>;
		if (typeof id !== 'string' || (status !== 'accepted' && status !== 'duplicate' && status !== 'refused')) {
			throw new Error('The sync reply holds an answer of the wrong shape.');
		}
		return typeof reason === 'string' ? { id, status, reason } : { id, status };
	});
	const serverTime = (body as { serverTime?: unknown }).serverTime;
	if (typeof serverTime === 'number' && Number.isFinite(serverTime)) return { answers: parsed, serverTime };
	const fromHeader = dateHeader ? Date.parse(dateHeader) : NaN;
	return Number.isFinite(fromHeader) ? { answers: parsed, serverTime: fromHeader } : { answers: parsed };
}

/**
 * Wraps a sync so only one tab of this browser runs it at a time, with the Web Locks API when the page has it
 * (secure contexts); elsewhere returns `sync` unchanged (the in-flight markers still stop double sends).
 */
export function acrossTabs<A extends unknown[], R>(
	name: string,
	sync: (...args: A) => Promise<R>
): (...args: A) => Promise<R> {
	const locks = typeof navigator !== 'undefined' ? navigator.locks : undefined;
	if (!locks) return sync;
	return (...args) => locks.request(name, () => sync(...args));
}
