import { error, fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { JOB_TRANSITIONS, RELEASE_ROLES } from '$lib/registers/job-states';
import { stateChangeSchema } from '$lib/registers/schema';
import { hasAnyRole, requireRole } from '$lib/server/access';
import * as jobService from '$lib/server/services/jobs.service';
import { startRunFormSchema } from '$lib/runner/start-run';
import { runsOfJob, startChoices } from '$lib/server/services/runner.service';
import * as runService from '$lib/server/services/runs.service';
import type { SessionUser } from '$lib/server/session-user';

export const load = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.readJobs);
	const id = z.uuid().safeParse(event.params.id);
	const detail = id.success ? await jobService.jobDetail(event.locals.em, id.data) : undefined;
	if (!detail) error(404, 'No such job.');
	const canChange = hasAnyRole(user, REGISTER_ROLES.changeState);
	const canRelease = hasAnyRole(user, RELEASE_ROLES);
	return {
		...detail,
		nextStates: canChange ? JOB_TRANSITIONS[detail.job.state].filter((s) => s !== 'released' || canRelease) : [],
		canAddPhotos: hasAnyRole(user, REGISTER_ROLES.edit),
		form: await superValidate(zod4(stateChangeSchema)),
		runs: await runsOfJob(event.locals.em, user, detail.job.id),
		start: hasAnyRole(user, runService.START_ROLES) ? await startForm(event.locals.em, user) : null
	};
};

/** The start-a-run form; a technician (who is not also a lead) can only assign the run to themselves. */
async function startForm(em: EntityManager, user: SessionUser) {
	const choices = await startChoices(em);
	const self = !hasAnyRole(user, runService.ASSIGN_OTHERS_ROLES);
	const assignees = self ? choices.assignees.filter((a) => a.id === user.id) : choices.assignees;
	const form = await superValidate(self ? { assignedToId: user.id } : undefined, zod4(startRunFormSchema), {
		errors: false
	});
	return { ...choices, assignees, form };
}

export const actions = {
	startRun: async (event) => {
		const user = requireRole(event, ...runService.START_ROLES);
		const form = await superValidate(event.request, zod4(startRunFormSchema));
		if (!form.valid) return fail(400, { form });
		const result = await runService.startRun(event.locals.em, user, { ...form.data, jobId: event.params.id });
		if (!result.ok) {
			if (result.field === 'procedureVersionId' || result.field === 'assignedToId')
				return setError(form, result.field, result.message);
			if (result.status === 404) error(404, result.message);
			return message(form, result.message, { status: 400 });
		}
		redirect(303, `/runs/${result.value.id}`);
	},
	state: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.changeState);
		const form = await superValidate(event.request, zod4(stateChangeSchema));
		if (!form.valid) return fail(400, { form });
		const result = await jobService.changeState(event.locals.em, user, event.params.id, form.data);
		if (!result.ok) {
			if (result.field === 'to') return setError(form, 'to', result.message);
			return message(form, result.message, { status: 400 });
		}
		return message(form, 'State changed.');
	},
	photos: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const files = (await event.request.formData())
			.getAll('photos')
			.filter((f): f is File => f instanceof File && f.size > 0);
		const photos = await Promise.all(
			files.map(async (f) => ({ bytes: new Uint8Array(await f.arrayBuffer()), filename: f.name }))
		);
		const result = await jobService.addPhotos(event.locals.em, user, event.params.id, photos);
		if (!result.ok) return fail(400, { photoError: result.message });
		return { photoNotice: `${result.value.added} photo${result.value.added === 1 ? '' : 's'} added.` };
	}
};
