import type { Handle, ServerInit } from '@sveltejs/kit';
import { error } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import type { RoleName } from '$lib/accounts/schema';
import { areaRoles, hasAnyRole, isPublicPath, requireUser } from '$lib/server/access';
import { authHandle } from '$lib/server/auth';
import { isDemo } from '$lib/server/env';
import * as sessions from '$lib/server/repositories/sessions';
import * as users from '$lib/server/repositories/users';
import { getRuntime, startRuntime } from '$lib/server/runtime';
import { THEME_COOKIE, parseThemeChoice } from '$lib/components/ui/theme';

export const init: ServerInit = async () => {
	const runtime = await startRuntime();
	// adapter-node emits this on SIGTERM/SIGINT once requests have drained; the pg pool would keep the process alive.
	process.once('sveltekit:shutdown', () => void runtime.stop());
};

/** Auth.js's own HTTP endpoints stay closed: sign-in goes only through our rate-limited action. */
const closeAuthEndpoints: Handle = ({ event, resolve }) => {
	if (event.url.pathname === '/auth' || event.url.pathname.startsWith('/auth/'))
		return new Response('Not found', { status: 404 });
	return resolve(event);
};

const unitOfWork: Handle = ({ event, resolve }) => {
	event.locals.em = getRuntime().orm.em.fork();
	return resolve(event);
};

/**
 * JWTs cannot be revoked on their own: the session row must be live (signing out revokes it), the person active,
 * and the token's session version current (bumped on deactivation, role change, password reset).
 */
const identity: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	event.locals.sessionId = null;
	const session = (await event.locals.auth()) as { uid?: string; sv?: number; sid?: string } | null;
	if (session?.uid && session.sid && (await sessions.isLive(event.locals.em, session.sid, session.uid))) {
		const user = await users.findById(event.locals.em, session.uid);
		if (user && user.active && user.sessionVersion === session.sv) {
			event.locals.sessionId = session.sid;
			event.locals.user = { id: user.id, name: user.name, email: user.email, roles: user.roles as RoleName[] };
		}
	}
	return resolve(event);
};

/**
 * Coarse role rules by path. Changes (POST and friends) are refused before any route code runs; a page that is not
 * for this person is still resolved, so its own `requireRole` can render the friendly 401/403 page, and this
 * net turns any page that forgot to check into a bare 403.
 */
const areaGuard: Handle = async ({ event, resolve }) => {
	const path = event.url.pathname;
	if (path.startsWith('/dev/') && !isDemo()) return new Response('Not found', { status: 404 });
	if (isPublicPath(path)) return resolve(event);
	const user = event.locals.user;
	const roles = areaRoles(path);
	if (user && (!roles || hasAnyRole(user, roles))) return resolve(event);
	if (event.request.method !== 'GET' && event.request.method !== 'HEAD') {
		requireUser(event);
		error(403, 'Your role does not allow this.');
	}
	const response = await resolve(event);
	if (response.status < 300) return new Response('Forbidden', { status: user ? 403 : 401 });
	return response;
};

const securityHeaders: Handle = async ({ event, resolve }) => {
	// The theme is rendered on <html> by the server: the CSP forbids the inline script that would otherwise set it.
	const theme = parseThemeChoice(event.cookies.get(THEME_COOKIE));
	const attr = theme === 'system' ? '' : `data-theme="${theme}"`;
	const response = await resolve(event, { transformPageChunk: ({ html }) => html.replace('%benchstamp.theme%', attr) });
	response.headers.set('X-Content-Type-Options', 'nosniff');
	response.headers.set('Referrer-Policy', 'same-origin');
	response.headers.set('Permissions-Policy', 'geolocation=(), microphone=()');
	return response;
};

export const handle = sequence(securityHeaders, closeAuthEndpoints, unitOfWork, authHandle, identity, areaGuard);
