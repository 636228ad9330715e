import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { renderProcedure } from '$lib/procedure';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { approveSchema, retireFormSchema } from './schema';

const READERS = ['technician', 'lead', 'quality', 'admin'] as const;

export const load = async (event) => {
	const user = requireRole(event, ...READERS);
	const r = await svc.get(event.locals.em, user, event.params.id);
	if (!r.ok) error(r.status, r.message);
	const latest = r.value.versions.at(-1);
	const current = latest ? await svc.getVersion(event.locals.em, r.value.id, latest.number) : null;
	return {
		procedure: r.value,
		html: current?.ok ? renderProcedure(current.value.model) : null,
		may: {
			edit: svc.may.edit(user),
			approve: svc.may.approve(user) && !!r.value.draft && !r.value.draft.contributors.includes(user.id),
			retire: svc.may.retire(user),
			diff: svc.may.readDrafts(user)
		},
		approveForm: await superValidate(zod4(approveSchema), { id: 'approve' }),
		retireForm: await superValidate(zod4(retireFormSchema), { id: 'retire' })
	};
};

export const actions = {
	submit: async (event) => {
		const user = requireRole(event, ...svc.EDIT_ROLES);
		const r = await svc.submit(event.locals.em, user, event.params.id);
		if (!r.ok) return fail(r.status, { submitError: r.message, problems: r.problems ?? [] });
		return { submitted: true };
	},
	approve: async (event) => {
		const user = requireRole(event, ...svc.APPROVE_ROLES);
		const form = await superValidate(event.request, zod4(approveSchema), { id: 'approve' });
		if (!form.valid) return fail(400, { approveForm: form });
		const r = await svc.approve(event.locals.em, user, event.params.id, form.data);
		if (!r.ok) return message(form, r.message, { status: r.status });
		return message(form, `Published as version ${r.value.number}.`);
	},
	retire: async (event) => {
		const user = requireRole(event, ...svc.RETIRE_ROLES);
		const form = await superValidate(event.request, zod4(retireFormSchema), { id: 'retire' });
		if (!form.valid) return fail(400, { retireForm: form });
		const r = await svc.retire(event.locals.em, user, event.params.id, form.data.number, form.data.reason);
		if (!r.ok) return message(form, r.message, { status: r.status });
		return message(form, `Version ${form.data.number} is retired: no new run may start on it.`);
	}
};
