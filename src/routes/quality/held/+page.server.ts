import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { resolveHeldSchema } from '$lib/devices/schema';
import { requireRole } from '$lib/server/access';
import { HELD_ROLES, listHeld, resolveHeld } from '$lib/server/services/devices-held';

export const load = async (event) => {
	requireRole(event, ...HELD_ROLES);
	return {
		held: (await listHeld(event.locals.em)).map(({ submission, ...rest }) => ({
			...rest,
			submission: JSON.stringify(submission, null, 2)
		})),
		form: await superValidate(zod4(resolveHeldSchema))
	};
};

export const actions = {
	resolve: async (event) => {
		const quality = requireRole(event, ...HELD_ROLES);
		const form = await superValidate(event.request, zod4(resolveHeldSchema));
		if (!form.valid) return fail(400, { form });
		const result = await resolveHeld(event.locals.em, quality, form.data);
		if (!result.ok) return message(form, result.message, { status: result.status });
		return message(form, 'Decision recorded.');
	}
};
