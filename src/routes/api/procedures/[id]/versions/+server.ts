import { requireUser } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { respond } from '../../respond';

/** Version history: who wrote, approved and published what, when and why. */
export const GET = async (event) => {
	const user = requireUser(event);
	const r = await svc.get(event.locals.em, user, event.params.id);
	return respond(r.ok ? { ok: true, value: r.value.versions } : r);
};
