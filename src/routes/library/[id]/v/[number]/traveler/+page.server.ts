import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';

/** Any published version as a paper traveler: every signed-in role (technicians read published versions). */
export const load = async (event) => {
	requireRole(event, 'technician', 'lead', 'quality', 'admin');
	const n = Number(event.params.number);
	const r = Number.isSafeInteger(n) && n > 0 ? await svc.getVersion(event.locals.em, event.params.id, n) : null;
	if (!r?.ok) error(404, 'No such version.');
	const v = r.value;
	return {
		procedureId: v.procedureId,
		model: v.model,
		version: { number: v.number, approver: v.approver.name, publishedAt: v.publishedAt, retiredAt: v.retiredAt }
	};
};
