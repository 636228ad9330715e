import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { changePinSchema } from '$lib/accounts/schema';
import { requireUser } from '$lib/server/access';
import * as accounts from '$lib/server/services/accounts.service';

export const load = async (event) => {
	requireUser(event);
	return { form: await superValidate(zod4(changePinSchema)) };
};

export const actions = {
	pin: async (event) => {
		const user = requireUser(event);
		const form = await superValidate(event.request, zod4(changePinSchema));
		if (!form.valid) return fail(400, { form });
		const result = await accounts.changeOwnPin(event.locals.em, user.id, form.data.currentPassword, form.data.pin);
		form.data.currentPassword = '';
		form.data.pin = '';
		form.data.pinAgain = '';
		if (!result.ok) {
			return message(form, result.message, { status: 400 });
		}
		return message(form, 'Your bench PIN is changed.');
	}
};
