import { json } from '@sveltejs/kit';
import { REGISTER_ROLES } from '$lib/registers/access';
import { calibrationSchema } from '$lib/registers/schema';
import { requireRole } from '$lib/server/access';
import { parseJsonBody, refusal } from '$lib/server/registers-json';
import * as toolService from '$lib/server/services/tools.service';

export const POST = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.edit);
	const parsedBody = await parseJsonBody(event.request, calibrationSchema);
	if (parsedBody.response) return parsedBody.response;
	const input = parsedBody.data;
	const result = await toolService.recordCalibration(event.locals.em, user, event.params.id, input);
	if (!result.ok) return refusal(result);
	return json(result.value, { status: 201 });
};
