import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { REGISTER_ROLES } from '$lib/registers/access';
import { toolSchema } from '$lib/registers/schema';
import { hasAnyRole, requireRole } from '$lib/server/access';
import * as tools from '$lib/server/repositories/tools';
import * as toolService from '$lib/server/services/tools.service';

export const load = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.readTools);
	const em = event.locals.em;
	return {
		tools: await tools.listWithStatus(em),
		dueSoon: await tools.listDueSoon(em),
		canEdit: hasAnyRole(user, REGISTER_ROLES.edit),
		form: await superValidate(zod4(toolSchema))
	};
};

export const actions = {
	create: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const form = await superValidate(event.request, zod4(toolSchema));
		if (!form.valid) return fail(400, { form });
		const result = await toolService.registerTool(event.locals.em, user, form.data);
		if (!result.ok) {
			if (result.field === 'assetTag') return setError(form, 'assetTag', result.message);
			return fail(400, { form, notice: result.message });
		}
		redirect(303, `/tools/${result.value.id}?registered=1`);
	}
};
