import { error, type RequestEvent } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import {
	RELEASE_ROLES,
	releaseJob,
	releaseRun,
	releaseSchema,
	releaseState
} from '$lib/server/services/release.service';
import * as runs from '$lib/server/repositories/runs';

/** The release panel's data: what keeps the run back (if anything), its rework runs, the two PIN forms. */
export async function releaseLoad(event: RequestEvent, runId: string) {
	const user = requireRole(event, ...RELEASE_ROLES);
	return {
		release: await releaseState(event.locals.em, user, runId),
		releaseRunForm: await superValidate(zod4(releaseSchema), { id: 'release-run', errors: false }),
		releaseJobForm: await superValidate(zod4(releaseSchema), { id: 'release-job', errors: false })
	};
}

async function act(event: RequestEvent, what: 'run' | 'job') {
	const user = requireRole(event, ...RELEASE_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such run.');
	const form = await superValidate(event.request, zod4(releaseSchema), { id: `release-${what}` });
	if (!form.valid) return message(form, 'Enter your PIN to sign.', { status: 400 });
	const em = event.locals.em;
	let result;
	if (what === 'run') result = await releaseRun(em, user, id.data, form.data);
	else {
		const run = await runs.findById(em, id.data);
		if (!run) error(404, 'No such run.');
		result = await releaseJob(em, user, (run.job as unknown as { id: string }).id, form.data);
	}
	form.data.pin = '';
	if (!result.ok) {
		if (result.status === 404) error(404, result.message);
		if ('field' in result && result.field === 'pin') return setError(form, 'pin', result.message);
		return message(form, result.message, { status: result.status });
	}
	return message(form, what === 'run' ? 'Run released.' : 'Job released.');
}

export const releaseRunAction = (event: RequestEvent) => act(event, 'run');
export const releaseJobAction = (event: RequestEvent) => act(event, 'job');
