import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { isoDate } from '$lib/registers/dates';
import { qualificationSchema } from '$lib/registers/schema';
import { hasAnyRole, requireRole } from '$lib/server/access';
import * as qualifications from '$lib/server/repositories/qualifications';
import * as training from '$lib/server/services/qualifications.service';

export const load = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.readTraining);
	const em = event.locals.em;
	const people = (await qualifications.listPeople(em)).filter((p) => p.active);
	const records = (await qualifications.listAll(em)).map(qualifications.toRecord);
	const today = isoDate();
	return {
		people: people.map((p) => ({
			id: p.id,
			name: p.name,
			roles: p.roles,
			records: records
				.filter((r) => r.userId === p.id)
				.map((r) => ({ ...r, inForce: qualifications.inForce(r, today) }))
		})),
		families: await qualifications.listFamilies(em),
		canEdit: hasAnyRole(user, REGISTER_ROLES.edit),
		form: await superValidate({ trainedOn: today, trainedBy: user.name }, zod4(qualificationSchema), { errors: false })
	};
};

export const actions = {
	record: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const form = await superValidate(event.request, zod4(qualificationSchema));
		if (!form.valid) return fail(400, { form });
		const result = await training.recordTraining(event.locals.em, user, form.data);
		if (!result.ok) {
			if (result.field === 'userId' || result.field === 'trainedOn')
				return setError(form, result.field, result.message);
			return message(form, result.message, { status: 400 });
		}
		return message(form, 'Training recorded.');
	},
	revoke: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const id = z.uuid().safeParse((await event.request.formData()).get('id'));
		if (!id.success) return fail(400, { notice: 'No such training record.' });
		const result = await training.revokeTraining(event.locals.em, user, id.data);
		if (!result.ok) return fail(400, { notice: result.message });
		return { notice: 'Training record revoked.' };
	}
};
