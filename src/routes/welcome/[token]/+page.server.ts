import { fail, redirect } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { setPasswordAndPinSchema } from '$lib/accounts/schema';
import * as accounts from '$lib/server/services/accounts.service';

export const load = async ({ locals, params }) => {
	const person = await accounts.peekToken(locals.em, params.token, 'invite');
	return {
		person: person ? { name: person.name, email: person.email } : null,
		form: await superValidate(zod4(setPasswordAndPinSchema))
	};
};

export const actions = {
	default: async ({ locals, params, request }) => {
		const form = await superValidate(request, zod4(setPasswordAndPinSchema));
		if (!form.valid) return fail(400, { form });
		const result = await accounts.acceptInvite(locals.em, params.token, form.data);
		if (!result.ok) return message(form, result.message, { status: 410 });
		redirect(303, '/signin?welcome=1');
	}
};
