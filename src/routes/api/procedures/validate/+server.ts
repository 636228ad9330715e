import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { sourceSchema } from '$lib/server/services/procedures.schema';
import { body } from '../respond';

/** The problems of a source, as the engine reports them (line/column 1-based). Saves nothing. */
export const POST = async (event) => {
	requireRole(event, ...svc.DRAFT_READ_ROLES);
	const input = await body(event.request, sourceSchema);
	return json(svc.validate(input.source));
};
