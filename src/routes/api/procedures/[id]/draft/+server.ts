import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { saveDraftSchema } from '$lib/server/services/procedures.schema';
import { body, respond } from '../../respond';

/** The open draft (lead, quality, admin). */
export const GET = async (event) => {
	const user = requireRole(event, ...svc.DRAFT_READ_ROLES);
	const r = await svc.get(event.locals.em, user, event.params.id);
	if (!r.ok) return respond(r);
	if (!r.value.draft) error(404, 'This procedure has no open draft.');
	return respond({ ok: true, value: r.value.draft });
};

/** Saves the draft (opening one when there is none): lead, admin. */
export const POST = async (event) => {
	const user = requireRole(event, ...svc.EDIT_ROLES);
	const input = await body(event.request, saveDraftSchema);
	return respond(await svc.saveDraft(event.locals.em, user, event.params.id, input));
};
