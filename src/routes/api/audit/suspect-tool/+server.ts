import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { parseQuery } from '$lib/server/registers-json';
import { AUDIT_ROLES, suspectTool, suspectToolSchema } from '$lib/server/services/search.service';

/** `?toolId=`: every run with a record signed with the tool since its last good calibration (see `suspectTool`). */
export const GET = async (event) => {
	requireRole(event, ...AUDIT_ROLES);
	const parsed = parseQuery(event.url, suspectToolSchema);
	if (parsed.response) return parsed.response;
	const answer = await suspectTool(event.locals.em, parsed.data.toolId);
	if (!answer) error(404, 'No such tool.');
	return json(answer);
};
