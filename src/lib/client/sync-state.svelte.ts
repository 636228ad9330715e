/**
 * The always-visible sync indicator's state as a Svelte 5 runes class. Instantiate it in a component (never at
 * module level, which would run during server rendering), then start it in an effect:
 *
 * ```svelte
 * const indicator = new SyncIndicator(store);
 * $effect(() => indicator.start());
 * ```
 */
import { computeSyncState, readSnapshot, type SyncState } from './outbox';
import type { OfflineStore } from './offline-store';

/** The state before the store has been read. */
export function emptySyncState(): SyncState {
	return {
		waiting: 0,
		photosWaiting: 0,
		refused: 0,
		lastSuccessAt: null,
		oldestWaitingAt: null,
		staleWarning: false,
		nextAttemptAt: null,
		lastError: null,
		clockOffsetMs: null,
		records: []
	};
}

/** Reads the outbox into reactive state; re-reads on every write through the store handle and on a clock tick. */
export class SyncIndicator {
	/** The current state; replaced as a whole on each read. */
	state: SyncState = $state(emptySyncState());
	/** False until the first read finished (so the UI does not show "0 waiting" before it knows). */
	loaded = $state(false);
	/** The last read's error (an unreadable store is itself something to show). */
	error: string | null = $state(null);

	readonly #store: OfflineStore;
	readonly #now: () => number;

	constructor(store: OfflineStore, now: () => number = Date.now) {
		this.#store = store;
		this.#now = now;
	}

	/** Re-reads the store once. */
	async refresh(): Promise<void> {
		try {
			this.state = computeSyncState(await readSnapshot(this.#store), this.#now());
			this.error = null;
		} catch (error) {
			this.error = error instanceof Error ? error.message : String(error);
		} finally {
			this.loaded = true;
		}
	}

	/**
	 * Starts following the store: reads now, after each write through the handle, and every `tickMs` (the 8-hour
	 * warning turns on with time alone). Returns the stop function, so it fits `$effect(() => indicator.start())`.
	 */
	start(tickMs = 60_000): () => void {
		void this.refresh();
		const unsubscribe = this.#store.onChange(() => void this.refresh());
		const tick = setInterval(() => void this.refresh(), tickMs);
		return () => {
			unsubscribe();
			clearInterval(tick);
		};
	}
}
