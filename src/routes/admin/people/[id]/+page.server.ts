import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { rolesSchema } from '$lib/accounts/schema';
import { requireRole } from '$lib/server/access';
import * as users from '$lib/server/repositories/users';
import * as accounts from '$lib/server/services/accounts.service';

export const load = async (event) => {
	requireRole(event, 'admin');
	const person = await users.findById(event.locals.em, event.params.id);
	if (!person) error(404, 'No such person.');
	return {
		person: {
			id: person.id,
			name: person.name,
			email: person.email,
			roles: person.roles,
			active: person.active,
			invited: !person.passwordHash
		},
		form: await superValidate({ roles: person.roles }, zod4(rolesSchema))
	};
};

export const actions = {
	roles: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(rolesSchema));
		if (!form.valid) return fail(400, { form });
		const result = await accounts.setRoles(event.locals.em, admin, event.params.id, form.data.roles);
		if (!result.ok) return message(form, result.message, { status: 400 });
		return message(form, 'Roles saved. Their open sessions must sign in again.');
	},
	deactivate: async (event) => {
		const admin = requireRole(event, 'admin');
		const result = await accounts.setActive(event.locals.em, admin, event.params.id, false);
		if (!result.ok) return fail(400, { notice: result.message });
		return { notice: 'Deactivated. Their open sessions are closed.' };
	},
	reactivate: async (event) => {
		const admin = requireRole(event, 'admin');
		const result = await accounts.setActive(event.locals.em, admin, event.params.id, true);
		if (!result.ok) return fail(400, { notice: result.message });
		return { notice: 'Reactivated.' };
	},
	resetPassword: async (event) => {
		const admin = requireRole(event, 'admin');
		const result = await accounts.startReset(event.locals.em, admin, event.params.id, 'password', event.url.origin);
		if (!result.ok) return fail(400, { notice: result.message });
		return { notice: 'A password reset link was e-mailed. They choose the new password themselves.' };
	},
	resetPin: async (event) => {
		const admin = requireRole(event, 'admin');
		const result = await accounts.startReset(event.locals.em, admin, event.params.id, 'pin', event.url.origin);
		if (!result.ok) return fail(400, { notice: result.message });
		return { notice: 'A PIN reset link was e-mailed. They choose the new PIN themselves.' };
	}
};
