import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import type { RoleName } from '$lib/accounts/schema';
import type { SessionUser } from './session-user';

/** Paths anyone may open; everything else needs a signed-in person. */
// `/tls`: the shop CA certificate and its install steps (a tablet needs them before it can trust the sign-in page).
const PUBLIC_PREFIXES = ['/signin', '/welcome/', '/reset/', '/api/health', '/record/', '/tls'];

/** Coarse rules by path prefix, checked in hooks; each route checks again with `requireRole`. */
export const AREA_ROLES: { prefix: string; roles: RoleName[] }[] = [
	{ prefix: '/admin', roles: ['admin'] },
	{ prefix: '/dev/', roles: ['admin'] },
	{ prefix: '/quality', roles: ['quality'] },
	// Verifying the whole ledger (issue 8): quality leads and admins.
	{ prefix: '/api/ledger', roles: ['quality', 'admin'] },
	// Exports of the run record (issue 8): quality leads only; the customer's record is public behind its token.
	{ prefix: '/api/exports', roles: ['quality'] },
	{ prefix: '/library', roles: ['technician', 'lead', 'quality', 'admin'] },
	{ prefix: '/bench', roles: ['technician', 'lead'] },
	// Enrolled tablets (offline issue, O): leads enrol/revoke on /bench/devices; the list is for leads, quality, admins.
	{ prefix: '/api/devices', roles: ['lead', 'quality', 'admin'] },
	// The held-records queue (offline issue, O): quality leads.
	{ prefix: '/api/audit/held', roles: ['quality'] },
	// Findings, dispositions and release (issue 8): quality leads only.
	{ prefix: '/api/findings', roles: ['quality'] },
	{ prefix: '/api/audit/runs', roles: ['quality'] },
	{ prefix: '/api/audit/jobs', roles: ['quality'] },
	// Search across runs (`/api/audit/runs`, above), suspect tool and trends (issue 8): quality leads only.
	{ prefix: '/api/audit/suspect-tool', roles: ['quality'] },
	{ prefix: '/api/audit/trends', roles: ['quality'] },
	// Registers (issue 5): everyone reads jobs and tools; parts and training are for leads, quality and admins.
	{ prefix: '/jobs', roles: ['technician', 'lead', 'quality', 'admin'] },
	{ prefix: '/tools', roles: ['technician', 'lead', 'quality', 'admin'] },
	{ prefix: '/parts', roles: ['lead', 'quality', 'admin'] },
	{ prefix: '/qualifications', roles: ['lead', 'quality', 'admin'] },
	{ prefix: '/api/people', roles: ['lead', 'quality', 'admin'] },
	// Runs (issue 6): each route narrows further (technicians see their own runs; admins do not submit records).
	{ prefix: '/api/runs', roles: ['technician', 'lead', 'quality', 'admin'] },
	// The bench runner page (issue 6): same readers as the runs API; the page narrows technicians to their own runs.
	{ prefix: '/runs', roles: ['technician', 'lead', 'quality', 'admin'] }
];

export const isPublicPath = (path: string) =>
	PUBLIC_PREFIXES.some((p) => path === p || path.startsWith(p.endsWith('/') ? p : `${p}/`));

export function areaRoles(path: string): RoleName[] | undefined {
	return AREA_ROLES.find(
		(a) => path === a.prefix || path.startsWith(a.prefix.endsWith('/') ? a.prefix : `${a.prefix}/`)
	)?.roles;
}

export const hasAnyRole = (user: SessionUser | null, roles: readonly RoleName[]) =>
	!!user && roles.some((r) => user.roles.includes(r));

/** The signed-in person, or a redirect to sign-in (pages) / 401 (APIs). */
export function requireUser(event: Pick<RequestEvent, 'locals' | 'url'>): SessionUser {
	const user = event.locals.user;
	if (user) return user;
	if (event.url.pathname.startsWith('/api/')) error(401, 'Sign in first.');
	redirect(303, `/signin?redirectTo=${encodeURIComponent(event.url.pathname + event.url.search)}`);
}

/** The signed-in person if they hold one of `roles`; otherwise 403 (or sign-in when anonymous). */
export function requireRole(event: Pick<RequestEvent, 'locals' | 'url'>, ...roles: RoleName[]): SessionUser {
	const user = requireUser(event);
	if (!hasAnyRole(user, roles)) error(403, 'Your role does not allow this page.');
	return user;
}
