import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { offlineRunner } from '$lib/server/services/offline.service';
import { READ_ROLES } from '$lib/server/services/runs.service';

/**
 * Everything the bench runner shows for one run, as JSON: the tablet stores it in IndexedDB and renders from there,
 * online or not. Same readers as the runner page (technicians: their own runs; others answer 404).
 */
export const GET = async (event) => {
	const user = requireRole(event, ...READ_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	const view = id.success ? await offlineRunner(event.locals.em, user, id.data) : undefined;
	if (!view?.ok) error(404, 'No such run.');
	return json(view.value, { headers: { 'cache-control': 'no-store' } });
};
