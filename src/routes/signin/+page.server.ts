import { fail, redirect } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { homeFor, signInSchema } from '$lib/accounts/schema';
import { signIn } from '$lib/server/auth';
import { env, isDemo } from '$lib/server/env';
import { getRuntime } from '$lib/server/runtime';
import { safeRedirect } from '$lib/server/safe-redirect';
import * as sessions from '$lib/server/repositories/sessions';
import * as accounts from '$lib/server/services/accounts.service';
import { signTicket } from '$lib/server/tokens';

/** One message for every refusal, so nobody can learn which accounts exist or are locked. */
const REFUSED = 'That e-mail and password did not sign you in. Check both, or ask your administrator.';

export const load = async ({ locals, url }) => {
	if (locals.user) redirect(303, safeRedirect(url.searchParams.get('redirectTo')) ?? homeFor(locals.user.roles));
	const form = await superValidate({ redirectTo: url.searchParams.get('redirectTo') ?? '/' }, zod4(signInSchema), {
		errors: false
	});
	return { form, demo: isDemo() };
};

export const actions = {
	default: async (event) => {
		const form = await superValidate(event.request, zod4(signInSchema));
		if (!form.valid) return fail(400, { form });
		const user = await accounts.authenticate(event.locals.em, getRuntime().limits, form.data, event.getClientAddress());
		if (!user) {
			form.data.password = '';
			return message(form, REFUSED, { status: 400 });
		}
		const body = new FormData();
		body.set('providerId', 'credentials');
		const session = sessions.open(event.locals.em, {
			userId: user.id,
			userAgent: event.request.headers.get('user-agent'),
			address: event.getClientAddress()
		});
		await event.locals.em.flush();
		body.set('ticket', signTicket(env().AUTH_SECRET, user.id, session.id));
		body.set('redirectTo', safeRedirect(form.data.redirectTo) ?? homeFor(user.roles));
		const headers = new Headers(event.request.headers);
		headers.delete('content-type');
		headers.delete('content-length');
		// Auth.js's action reads its input from the request body; hand it a request of our own making.
		await signIn({ ...event, request: new Request(event.url, { method: 'POST', headers, body }) });
	}
};
