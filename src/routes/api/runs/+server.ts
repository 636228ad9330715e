import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { parseJsonBody } from '$lib/server/registers-json';
import { startRunSchema } from '$lib/server/services/runs.schema';
import * as runService from '$lib/server/services/runs.service';

/** Starts a run: `{ jobId, procedureVersionId, contentHash, assignedToId }` → 201 `{ id }`. Leads and admins. */
export const POST = async (event) => {
	const user = requireRole(event, ...runService.START_ROLES);
	const parsed = await parseJsonBody(event.request, startRunSchema);
	if (parsed.response) return parsed.response;
	const result = await runService.startRun(event.locals.em, user, parsed.data);
	if (!result.ok) {
		if (result.status === 403 || result.status === 404) error(result.status, result.message);
		return json(
			{ message: result.message, errors: result.field ? { [result.field]: [result.message] } : {} },
			{ status: result.status }
		);
	}
	return json(result.value, { status: 201 });
};
