/**
 * The page's sync results, for parts of the page other than the indicator (the runner re-opens its run when a
 * sync stored records). The layout's tablet sync publishes; anyone may listen.
 */
import type { SyncResult } from './sync';

type Listener = (result: SyncResult) => void;
const listeners = new Set<Listener>();

/** Listens to every sync result; returns the unsubscribe function (fits `$effect(() => onSynced(…))`). */
export function onSynced(listener: Listener): () => void {
	listeners.add(listener);
	return () => void listeners.delete(listener);
}

export function publishSynced(result: SyncResult): void {
	for (const l of listeners) l(result);
}
