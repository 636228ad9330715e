import { json } from '@sveltejs/kit';
import { REGISTER_ROLES } from '$lib/registers/access';
import { stateChangeSchema } from '$lib/registers/schema';
import { requireRole } from '$lib/server/access';
import { parseJsonBody, refusal } from '$lib/server/registers-json';
import * as jobService from '$lib/server/services/jobs.service';

/** `{ to, reason }`: moves the job if the move is allowed; 400 with the reason when not. */
export const POST = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.changeState);
	const parsedBody = await parseJsonBody(event.request, stateChangeSchema);
	if (parsedBody.response) return parsedBody.response;
	const input = parsedBody.data;
	const result = await jobService.changeState(event.locals.em, user, event.params.id, input);
	if (!result.ok) return refusal(result);
	return json(result.value);
};
