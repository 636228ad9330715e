import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { retireSchema } from '$lib/server/services/procedures.schema';
import { body, respond, versionNumber } from '../../../../respond';

/** Retires a version: no new run may start on it. Lead, quality, admin. */
export const POST = async (event) => {
	const user = requireRole(event, ...svc.RETIRE_ROLES);
	const number = versionNumber(event.params.number);
	const input = await body(event.request, retireSchema);
	return respond(await svc.retire(event.locals.em, user, event.params.id, number, input.reason));
};
