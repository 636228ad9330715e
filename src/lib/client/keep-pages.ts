/**
 * Asks the service worker to fetch and keep pages for offline use (see src/service-worker: `keep-pages`). A page is
 * otherwise kept only when it was opened with a full navigation; "Keep on this tablet" must also work for a run the
 * technician has not opened yet. Resolves with the URLs the worker kept (none when there is no worker).
 */
export async function keepPagesOffline(paths: string[], timeoutMs = 20_000): Promise<string[]> {
	if (typeof navigator === 'undefined' || !('serviceWorker' in navigator)) return [];
	const registration = await Promise.race([
		navigator.serviceWorker.ready,
		new Promise<undefined>((resolve) => setTimeout(() => resolve(undefined), timeoutMs))
	]);
	const worker = registration?.active;
	if (!worker) return [];
	const urls = paths.map((p) => new URL(p, location.origin).href);
	return new Promise((resolve) => {
		const channel = new MessageChannel();
		const timer = setTimeout(() => resolve([]), timeoutMs);
		channel.port1.onmessage = (event) => {
			clearTimeout(timer);
			resolve(((event.data as { kept?: string[] } | null)?.kept ?? []).filter((u) => typeof u === 'string'));
		};
		worker.postMessage({ type: 'keep-pages', urls }, [channel.port2]);
	});
}
