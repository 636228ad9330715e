import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/access';
import { enrolLabelSchema, enrolSchema, revokeSchema } from '$lib/devices/schema';
import * as devicesService from '$lib/server/services/devices.service';

export const load = async (event) => {
	requireRole(event, ...devicesService.DEVICE_MANAGE_ROLES);
	return {
		devices: await devicesService.list(event.locals.em),
		enrolForm: await superValidate(zod4(enrolLabelSchema)),
		revokeForm: await superValidate(zod4(revokeSchema))
	};
};

export const actions = {
	enrol: async (event) => {
		const lead = requireRole(event, ...devicesService.DEVICE_MANAGE_ROLES);
		const form = await superValidate(event.request, zod4(enrolSchema));
		if (!form.valid) {
			// The key is made by the page, not typed: a problem with it is said in the form's message.
			const keyProblem = form.errors.publicKey;
			return keyProblem
				? message(form, 'The tablet sent a key the server cannot use.', { status: 400 })
				: fail(400, { form });
		}
		const result = await devicesService.enrol(event.locals.em, lead, form.data);
		if (!result.ok) return message(form, result.message, { status: result.status });
		return { ...message(form, `This tablet is enrolled as “${result.value.label}”.`), enrolled: result.value };
	},
	revoke: async (event) => {
		const lead = requireRole(event, ...devicesService.DEVICE_MANAGE_ROLES);
		const form = await superValidate(event.request, zod4(revokeSchema));
		if (!form.valid) return fail(400, { form });
		const result = await devicesService.revoke(event.locals.em, lead, form.data);
		if (!result.ok) return message(form, result.message, { status: result.status });
		return message(form, `“${result.value.label}” is revoked: its records will be refused and held.`);
	}
};
