/// <reference no-default-lib="true"/>
/// <reference lib="esnext" />
/// <reference lib="webworker" />
/// <reference types="@sveltejs/kit" />
/**
 * The app shell offline: this version's build assets and static files in a cache named by `version` (old caches
 * are deleted on activate), pages network-first with the bench pages kept for offline use and a static offline page
 * otherwise. Never `/api/*`, never a POST (see strategy.ts). The offline store (IndexedDB) is the other layer.
 */
import { build, files, version } from '$service-worker';
import { mayKeepPage, OFFLINE_FALLBACK, pagesToKeep, strategyFor } from './strategy';

const sw = self as unknown as ServiceWorkerGlobalScope;
const SHELL = `benchstamp-shell-${version}`;
const PAGES = 'benchstamp-pages';
const assets = new Set([...build, ...files]);

sw.addEventListener('install', (event) => {
	event.waitUntil(
		caches
			.open(SHELL)
			.then((cache) => cache.addAll([...assets]))
			.then(() => sw.skipWaiting())
	);
});

sw.addEventListener('activate', (event) => {
	event.waitUntil(
		caches
			.keys()
			.then((keys) => Promise.all(keys.filter((k) => k !== SHELL && k !== PAGES).map((k) => caches.delete(k))))
			.then(() => sw.clients.claim())
	);
});

async function cacheFirst(request: Request): Promise<Response> {
	const hit = await caches.match(request, { cacheName: SHELL });
	return hit ?? fetch(request);
}

async function networkFirst(request: Request, pathname: string): Promise<Response> {
	try {
		const response = await fetch(request);
		if (mayKeepPage(pathname, response.status, response.headers.get('content-type'))) {
			const copy = response.clone();
			void caches.open(PAGES).then((c) => c.put(request, copy));
		}
		return response;
	} catch (e) {
		const kept = await caches.match(request, { cacheName: PAGES, ignoreSearch: true, ignoreVary: true });
		if (kept) return kept;
		const fallback = await caches.match(OFFLINE_FALLBACK, { cacheName: SHELL });
		if (fallback) return fallback;
		throw e;
	}
}

sw.addEventListener('fetch', (event) => {
	const url = new URL(event.request.url);
	const strategy = strategyFor(
		{
			method: event.request.method,
			sameOrigin: url.origin === sw.location.origin,
			pathname: url.pathname,
			navigate: event.request.mode === 'navigate'
		},
		assets
	);
	if (strategy === 'forget-pages') {
		// Let the sign-out through untouched; the next person on this tablet must not find the last one's pages.
		event.waitUntil(caches.delete(PAGES));
		return;
	}
	if (strategy === 'cache-first') event.respondWith(cacheFirst(event.request));
	else if (strategy === 'network-first') event.respondWith(networkFirst(event.request, url.pathname));
});

/**
 * "Keep on this tablet" on the bench: the page asks the worker to fetch runner pages now (with the session cookie)
 * and keep them, so a run opens offline even if the technician never opened it online. The answer, on the
 * message's port, lists the pages kept.
 */
async function keepPages(urls: string[]): Promise<string[]> {
	const cache = await caches.open(PAGES);
	const kept: string[] = [];
	for (const url of urls) {
		try {
			const response = await fetch(url, { credentials: 'same-origin', headers: { accept: 'text/html' } });
			if (!mayKeepPage(new URL(url).pathname, response.status, response.headers.get('content-type'))) continue;
			await cache.put(url, response);
			kept.push(url);
		} catch {
			// the server went away meanwhile; the page says which were not kept
		}
	}
	return kept;
}

sw.addEventListener('message', (event) => {
	const urls = pagesToKeep(event.data, sw.location.origin);
	if (urls.length === 0) return;
	event.waitUntil(keepPages(urls).then((kept) => event.ports[0]?.postMessage({ type: 'kept-pages', kept })));
});
