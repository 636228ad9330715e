import { error, fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { isoDate } from '$lib/registers/dates';
import { lotSchema } from '$lib/registers/schema';
import { hasAnyRole, requireRole } from '$lib/server/access';
import * as parts from '$lib/server/repositories/parts';
import * as partService from '$lib/server/services/parts.service';

export const load = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.readPartsPages);
	const id = z.uuid().safeParse(event.params.id);
	const part = id.success ? await parts.findById(event.locals.em, id.data) : null;
	if (!part) error(404, 'No such part.');
	return {
		part: parts.toPartSummary(part),
		lots: (await parts.listLots(event.locals.em, part.id)).map(parts.toLotSummary),
		canEdit: hasAnyRole(user, REGISTER_ROLES.edit),
		form: await superValidate({ receivedOn: isoDate() }, zod4(lotSchema), { errors: false })
	};
};

export const actions = {
	lot: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const form = await superValidate(event.request, zod4(lotSchema));
		if (!form.valid) return fail(400, { form });
		const result = await partService.receiveLot(event.locals.em, user, event.params.id, form.data);
		if (!result.ok) {
			if (result.field === 'lotNumber' || result.field === 'quantity' || result.field === 'receivedOn')
				return setError(form, result.field, result.message);
			return message(form, result.message, { status: 400 });
		}
		return message(form, 'Lot recorded.');
	}
};
