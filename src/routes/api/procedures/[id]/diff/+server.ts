import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { diffQuerySchema } from '$lib/server/services/procedures.schema';
import { respond } from '../../respond';

/** Line diff between two versions (`?from=1&to=2`; either may be `draft`): lead, quality, admin. */
export const GET = async (event) => {
	const user = requireRole(event, ...svc.DRAFT_READ_ROLES);
	const q = diffQuerySchema.safeParse(Object.fromEntries(event.url.searchParams));
	if (!q.success) error(400, 'Give two versions: ?from=1&to=2 (or draft).');
	return respond(await svc.diff(event.locals.em, user, event.params.id, q.data.from, q.data.to));
};
