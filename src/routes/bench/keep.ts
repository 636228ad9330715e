/** "Keep on this tablet": the run's view and pictures into the store, its page into the worker's cache, storage persisted. */
import { keepPagesOffline } from '$lib/client/keep-pages';
import { makeAvailable } from '$lib/client/runner-source';
import { tabletStore } from '$lib/client/tablet-store';

export interface KeepResult {
	ok: boolean;
	message: string;
	persist: 'granted' | 'refused' | 'unsupported';
}

async function persistStorage(): Promise<KeepResult['persist']> {
	const storage = typeof navigator !== 'undefined' ? navigator.storage : undefined;
	if (!storage?.persist) return 'unsupported';
	if (await storage.persisted?.()) return 'granted';
	return (await storage.persist()) ? 'granted' : 'refused';
}

export async function keepOnTablet(runId: string): Promise<KeepResult> {
	const persist = await persistStorage().catch(() => 'unsupported' as const);
	try {
		const stored = await makeAvailable(await tabletStore(), fetch, runId);
		const pages = await keepPagesOffline([`/runs/${runId}`, '/bench']);
		const missing = stored.images.filter((i) => !i.blob).length;
		const page = pages.some((u) => u.endsWith(`/runs/${runId}`));
		const parts = [
			page
				? 'Kept on this tablet: it opens without the network.'
				: 'The run is on this tablet, but its page could not be kept: open it once while the network is up.',
			missing
				? `${missing} of ${stored.images.length} pictures could not be fetched; they show as missing offline.`
				: ''
		];
		return { ok: page && !missing, message: parts.filter(Boolean).join(' '), persist };
	} catch (error) {
		const why = error instanceof Error ? error.message : String(error);
		return { ok: false, message: `Not kept on this tablet: ${why}`, persist };
	}
}
