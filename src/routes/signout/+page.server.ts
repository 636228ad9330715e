import { redirect } from '@sveltejs/kit';
import { signOut } from '$lib/server/auth';
import * as sessions from '$lib/server/repositories/sessions';

export const load = () => redirect(303, '/');

export const actions = {
	default: async (event) => {
		// Revoked on the server too: a copy of the cookie is worthless from now on.
		if (event.locals.sessionId) await sessions.revoke(event.locals.em, event.locals.sessionId);
		const headers = new Headers(event.request.headers);
		headers.delete('content-type');
		headers.delete('content-length');
		const body = new FormData();
		body.set('redirectTo', '/signin');
		await signOut({ ...event, request: new Request(event.url, { method: 'POST', headers, body }) });
	}
};
