import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { inviteSchema } from '$lib/accounts/schema';
import { requireRole } from '$lib/server/access';
import * as users from '$lib/server/repositories/users';
import * as accounts from '$lib/server/services/accounts.service';

export const load = async (event) => {
	requireRole(event, 'admin');
	const people = await users.listAll(event.locals.em);
	return {
		people: people.map((u) => ({
			id: u.id,
			name: u.name,
			email: u.email,
			roles: u.roles,
			active: u.active,
			invited: !u.passwordHash
		})),
		form: await superValidate(zod4(inviteSchema))
	};
};

export const actions = {
	invite: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidate(event.request, zod4(inviteSchema));
		if (!form.valid) return fail(400, { form });
		const result = await accounts.invite(event.locals.em, admin, form.data, event.url.origin);
		if (!result.ok) {
			return message(form, result.message, { status: 400 });
		}
		return message(form, `Invitation sent to ${result.value.email}.`);
	}
};
