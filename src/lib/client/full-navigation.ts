/**
 * Links into the runner and the bench load with a FULL navigation: a client-side one would fetch the page's
 * `__data.json`, which the service worker never answers (it is not a page), so it fails offline; and only a real
 * navigation lets the worker keep a copy of the page for offline use (see src/service-worker/strategy.ts).
 */
import { mayKeepPage } from '../../service-worker/strategy';

/** True when going from `from` to `to` (same origin) should be a full page load. */
export function needsFullNavigation(from: URL | null | undefined, to: URL): boolean {
	if (from && from.origin !== to.origin) return false;
	if (!mayKeepPage(to.pathname, 200, 'text/html')) return false;
	return from?.pathname !== to.pathname;
}
