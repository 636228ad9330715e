import { fail, redirect } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { newPasswordSchema, newPinSchema } from '$lib/accounts/schema';
import * as accounts from '$lib/server/services/accounts.service';

export const load = async ({ locals, params }) => {
	const forPassword = await accounts.peekToken(locals.em, params.token, 'password_reset');
	const forPin = forPassword ? undefined : await accounts.peekToken(locals.em, params.token, 'pin_reset');
	return {
		kind: forPassword ? ('password' as const) : forPin ? ('pin' as const) : null,
		name: (forPassword ?? forPin)?.name ?? null,
		passwordForm: await superValidate(zod4(newPasswordSchema)),
		pinForm: await superValidate(zod4(newPinSchema))
	};
};

export const actions = {
	password: async ({ locals, params, request }) => {
		const form = await superValidate(request, zod4(newPasswordSchema));
		if (!form.valid) return fail(400, { passwordForm: form });
		const result = await accounts.completeReset(locals.em, params.token, { password: form.data.password });
		if (!result.ok) return message(form, result.message, { status: 410 });
		redirect(303, '/signin?reset=password');
	},
	pin: async ({ locals, params, request }) => {
		const form = await superValidate(request, zod4(newPinSchema));
		if (!form.valid) return fail(400, { pinForm: form });
		const result = await accounts.completeReset(locals.em, params.token, { pin: form.data.pin });
		if (!result.ok) return message(form, result.message, { status: 410 });
		redirect(303, '/signin?reset=pin');
	}
};
