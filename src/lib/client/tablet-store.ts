/**
 * The page's one handle on this tablet's offline store. Every part of the page (runner, sync indicator, photo
 * capture) shares it, because the outbox's in-memory sync lock lives on the handle (see offline-store.ts).
 */
import { openOfflineStore, type OfflineStore } from './offline-store';

let opening: Promise<OfflineStore> | undefined;

/** Opens (once per page) and migrates the store; a failed open is retried on the next call. */
export function tabletStore(): Promise<OfflineStore> {
	opening ??= openOfflineStore().catch((error: unknown) => {
		opening = undefined;
		throw error;
	});
	return opening;
}
