import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { respond } from '../../respond';

/** Submits the open draft for approval (lead, admin); refused while it has errors. */
export const POST = async (event) => {
	const user = requireRole(event, ...svc.EDIT_ROLES);
	return respond(await svc.submit(event.locals.em, user, event.params.id));
};
