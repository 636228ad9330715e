import { requireRole, requireUser } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { sourceSchema } from '$lib/server/services/procedures.schema';
import { body, respond } from './respond';

/** The library: every signed-in person; technicians get published procedures only. */
export const GET = async (event) => {
	const user = requireUser(event);
	return respond({ ok: true, value: await svc.list(event.locals.em, user) });
};

/** A new procedure with its first draft (lead, admin). */
export const POST = async (event) => {
	const user = requireRole(event, ...svc.EDIT_ROLES);
	const input = await body(event.request, sourceSchema);
	return respond(await svc.create(event.locals.em, user, input.source), 201);
};
