import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { REGISTER_ROLES } from '$lib/registers/access';
import { isoDate } from '$lib/registers/dates';
import { jobSchema } from '$lib/registers/schema';
import { requireRole } from '$lib/server/access';
import * as jobService from '$lib/server/services/jobs.service';

export const load = async (event) => {
	requireRole(event, ...REGISTER_ROLES.edit);
	return { form: await superValidate({ receivedOn: isoDate() }, zod4(jobSchema), { errors: false }) };
};

export const actions = {
	default: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const data = await event.request.formData();
		const form = await superValidate(data, zod4(jobSchema));
		if (!form.valid) return fail(400, { form });
		const files = data.getAll('photos').filter((f): f is File => f instanceof File && f.size > 0);
		const photos = await Promise.all(
			files.map(async (f) => ({ bytes: new Uint8Array(await f.arrayBuffer()), filename: f.name }))
		);
		const result = await jobService.openJob(event.locals.em, user, form.data, photos);
		if (!result.ok) {
			if (result.field === 'receivedOn') return setError(form, 'receivedOn', result.message);
			return message(form, result.message, { status: 400 });
		}
		redirect(303, `/jobs/${result.value.id}`);
	}
};
