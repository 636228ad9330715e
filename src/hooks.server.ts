import type { Handle, ServerInit } from '@sveltejs/kit';
import { error } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import type { RoleName } from '$lib/accounts/schema';
import { areaRoles, hasAnyRole, isPublicPath, requireUser } from '$lib/server/access';
import { authHandle } from '$lib/server/auth';
import * as users from '$lib/server/repositories/users';
import { getRuntime, startRuntime } from '$lib/server/runtime';

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

/** JWTs cannot be revoked on their own: the person must still be active and the token's session version current. */
const identity: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	const session = (await event.locals.auth()) as { uid?: string; sv?: number } | null;
	if (session?.uid) {
		const user = await users.findById(event.locals.em, session.uid);
		if (user && user.active && user.sessionVersion === session.sv) {
			event.locals.user = { id: user.id, name: user.name, email: user.email, roles: user.roles as RoleName[] };
		}
	}
	return resolve(event);
};

const areaGuard: Handle = ({ event, resolve }) => {
	const path = event.url.pathname;
	if (isPublicPath(path)) return resolve(event);
	const user = requireUser(event);
	const roles = areaRoles(path);
	if (roles && !hasAnyRole(user, roles)) error(403, 'Your role does not allow this page.');
	return resolve(event);
};

const securityHeaders: Handle = async ({ event, resolve }) => {
	const response = await resolve(event);
	response.headers.set('X-Content-Type-Options', 'nosniff');
	response.headers.set('Referrer-Policy', 'same-origin');
	response.headers.set('Permissions-Policy', 'geolocation=(), microphone=()');
	return response;
};

export const handle = sequence(securityHeaders, closeAuthEndpoints, unitOfWork, authHandle, identity, areaGuard);
