import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { REGISTER_ROLES } from '$lib/registers/access';
import { partSchema } from '$lib/registers/schema';
import { hasAnyRole, requireRole } from '$lib/server/access';
import * as parts from '$lib/server/repositories/parts';
import * as partService from '$lib/server/services/parts.service';

export const load = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.readPartsPages);
	return {
		parts: (await parts.listParts(event.locals.em)).map(parts.toPartSummary),
		canEdit: hasAnyRole(user, REGISTER_ROLES.edit),
		form: await superValidate({ unit: 'ea' }, zod4(partSchema), { errors: false })
	};
};

export const actions = {
	create: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const form = await superValidate(event.request, zod4(partSchema));
		if (!form.valid) return fail(400, { form });
		const result = await partService.createPart(event.locals.em, user, form.data);
		if (!result.ok) return setError(form, 'partNumber', result.message);
		redirect(303, `/parts/${result.value.id}`);
	}
};
