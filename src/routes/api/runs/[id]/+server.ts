import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import * as runService from '$lib/server/services/runs.service';

/** The run with its ledger records in chain order. Technicians: their own runs only (others answer 404). */
export const GET = async (event) => {
	const user = requireRole(event, ...runService.READ_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	const result = id.success ? await runService.getRun(event.locals.em, user, id.data) : undefined;
	if (!result?.ok) error(404, 'No such run.');
	return json(result.value);
};
