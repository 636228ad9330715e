/**
 * What the service worker does with each request, as a pure decision (unit-tested without a worker). Conservative on
 * purpose: it never answers for `/api/*`, never for anything but GET, and never caches a response that carries a
 * person's data except the bench pages a technician needs offline, which are dropped again at sign-out.
 */

/** What to do with one request. */
export type Strategy =
	/** Let the browser fetch it as if there were no service worker. */
	| 'pass'
	/** Build assets and static files of this version: from the cache, else the network. */
	| 'cache-first'
	/** A page: the network, falling back to a cached copy of it (bench pages only), then the offline page. */
	| 'network-first'
	/** Sign-out: let it through and forget every cached page. */
	| 'forget-pages';

/** Pages worth keeping a copy of for offline use: the bench and the runner. */
export const OFFLINE_PAGE_PREFIXES = ['/bench', '/runs/'];
export const OFFLINE_FALLBACK = '/offline.html';

export interface RequestFacts {
	method: string;
	/** Same origin as the worker. */
	sameOrigin: boolean;
	pathname: string;
	/** `request.mode === 'navigate'`. */
	navigate: boolean;
}

export function strategyFor(r: RequestFacts, assets: ReadonlySet<string>): Strategy {
	if (!r.sameOrigin) return 'pass';
	if (r.pathname === '/signout' || r.pathname.startsWith('/signout/')) return 'forget-pages';
	if (r.method !== 'GET') return 'pass';
	if (r.pathname === '/api' || r.pathname.startsWith('/api/')) return 'pass';
	if (assets.has(r.pathname)) return 'cache-first';
	if (r.navigate) return 'network-first';
	return 'pass';
}

/** Whether a page answer may be stored for offline use: a plain 200 HTML page of the bench. */
export function mayKeepPage(pathname: string, status: number, contentType: string | null): boolean {
	return (
		status === 200 &&
		(contentType ?? '').startsWith('text/html') &&
		OFFLINE_PAGE_PREFIXES.some((p) => pathname === p || pathname.startsWith(p.endsWith('/') ? p : `${p}/`))
	);
}

/** A message from a page asking the worker to fetch and keep pages for offline use (the bench's take-offline). */
export interface KeepPagesMessage {
	type: 'keep-pages';
	urls: string[];
}

/**
 * The same-origin page URLs of a keep-pages message the worker may fetch and keep: bench and runner pages only
 * (anything else, another origin or a malformed message gives nothing). Search and hash are dropped: pages are
 * kept and looked up by path.
 */
export function pagesToKeep(message: unknown, origin: string): string[] {
	const m = message as Partial<KeepPagesMessage> | null;
	if (!m || m.type !== 'keep-pages' || !Array.isArray(m.urls)) return [];
	const out = new Set<string>();
	for (const raw of m.urls) {
		if (typeof raw !== 'string') continue;
		let url: URL;
		try {
			url = new URL(raw, origin);
		} catch {
			continue;
		}
		if (url.origin !== origin || !mayKeepPage(url.pathname, 200, 'text/html')) continue;
		out.add(url.origin + url.pathname);
	}
	return [...out];
}
