import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { approveSchema } from '$lib/server/services/procedures.schema';
import { body, respond } from '../../respond';

/** Publishes the submitted draft as the next version: lead or quality, never someone who wrote it. */
export const POST = async (event) => {
	const user = requireRole(event, ...svc.APPROVE_ROLES);
	const input = await body(event.request, approveSchema);
	return respond(await svc.approve(event.locals.em, user, event.params.id, input), 201);
};
