import { requireUser } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { respond } from '../respond';

/** One procedure and its version history; the open draft only for lead, quality and admin. */
export const GET = async (event) => {
	const user = requireUser(event);
	return respond(await svc.get(event.locals.em, user, event.params.id));
};
