import { error, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { dispositionSchema } from '$lib/server/services/dispositions.schema';
import { DISPOSITION_ROLES, dispose, findingDetail } from '$lib/server/services/dispositions.service';

/** One finding and the form a quality lead decides it with (signed with their PIN). */
export const load = async (event) => {
	const user = requireRole(event, ...DISPOSITION_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	const detail = id.success ? await findingDetail(event.locals.em, user, id.data) : null;
	if (!detail) error(404, 'No such finding.');
	return { ...detail, form: await superValidate(zod4(dispositionSchema), { errors: false }) };
};

export const actions = {
	dispose: async (event) => {
		const user = requireRole(event, ...DISPOSITION_ROLES);
		const id = z.uuid().safeParse(event.params.id);
		if (!id.success) error(404, 'No such finding.');
		const form = await superValidate(event.request, zod4(dispositionSchema));
		if (!form.valid) return message(form, 'Some fields need attention.', { status: 400 });
		const result = await dispose(event.locals.em, user, id.data, form.data);
		if (!result.ok) {
			if (result.status === 404) error(404, result.message);
			form.data.pin = '';
			if (result.field === 'pin' || result.field === 'assignedToId')
				return setError(form, result.field, result.message);
			return message(form, result.message, { status: result.status });
		}
		redirect(303, `/quality/findings/${id.data}`);
	}
};
