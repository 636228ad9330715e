import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import * as audit from '$lib/server/services/audit.service';

/** Recomputes the run's chain against its anchors: intact with head and count, or the first bad record and why. */
export const POST = async (event) => {
	requireRole(event, ...audit.VERIFY_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	const result = id.success ? await audit.verifyRun(event.locals.em, id.data) : null;
	if (!result) error(404, 'No such run.');
	return json(result);
};
