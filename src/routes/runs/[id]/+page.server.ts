import { error, fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { mayOpenRun } from '$lib/server/services/offline.service';
import { DECIDE_ROLES, decideVersion } from '$lib/server/services/run-versions.service';
import { READ_ROLES } from '$lib/server/services/runs.service';
import type { RequestEvent } from './$types';

/**
 * The bench runner: technicians their own runs (assigned or signed in), leads and quality all, admins read. The
 * page renders from the tablet's offline store (`openRun`, filled from `GET /api/runs/:id/runner`), so this load
 * only decides who gets the page: the same readers as that route, anyone else "not found". The HTML it answers is
 * what the service worker keeps for offline use, with this small payload inside it.
 */
export const load = async (event) => {
	const user = requireRole(event, ...READ_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success || !(await mayOpenRun(event.locals.em, user, id.data))) error(404, 'No such run.');
	return { runId: id.data };
};

const decisionSchema = z.object({ toVersionId: z.uuid('Reload the run: the version to decide about is missing.') });

/** A lead's decision about a newer published version: continue on the run's version, or move to the newer one. */
async function decide(event: RequestEvent, decision: 'continue' | 'move') {
	const user = requireRole(event, ...DECIDE_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such run.');
	const parsed = decisionSchema.safeParse(Object.fromEntries(await event.request.formData()));
	const toVersionId = parsed.success ? parsed.data.toVersionId : '';
	const result = await decideVersion(event.locals.em, user, id.data, { decision, toVersionId });
	if (!result.ok) {
		if (result.status === 404) error(404, result.message);
		return fail(parsed.success ? result.status : 400, {
			decisionError: parsed.success ? result.message : parsed.error.issues[0].message
		});
	}
	if (decision === 'move') redirect(303, `/runs/${result.value.runId}`);
	return { decided: 'continue' as const };
}

export const actions = {
	continueOn: (event) => decide(event, 'continue'),
	move: (event) => decide(event, 'move')
};
