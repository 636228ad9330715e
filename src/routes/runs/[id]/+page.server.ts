import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { hasAnyRole, requireRole } from '$lib/server/access';
import { runnerView } from '$lib/server/services/runner.service';
import { READ_ROLES, SUBMIT_ROLES } from '$lib/server/services/runs.service';

/** The bench runner: technicians their own runs (assigned or signed in), leads and quality all, admins read. */
export const load = async (event) => {
	const user = requireRole(event, ...READ_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	const view = id.success ? await runnerView(event.locals.em, user, id.data) : undefined;
	if (!view?.ok) error(404, 'No such run.');
	return { ...view.value, canSign: hasAnyRole(user, SUBMIT_ROLES) };
};
