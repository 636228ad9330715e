import { redirect } from '@sveltejs/kit';
import { signOut } from '$lib/server/auth';

export const load = () => redirect(303, '/');

export const actions = {
	default: async (event) => {
		const headers = new Headers(event.request.headers);
		headers.delete('content-type');
		headers.delete('content-length');
		const body = new FormData();
		body.set('redirectTo', '/signin');
		await signOut({ ...event, request: new Request(event.url, { method: 'POST', headers, body }) });
	}
};
