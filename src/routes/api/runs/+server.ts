import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { parseJsonBody, parseQuery } from '$lib/server/registers-json';
import { listRuns, runListQuerySchema } from '$lib/server/services/run-list.service';
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

/**
 * The run list: `?state=&jobId=&assignedTo=&limit=&offset=` → `{ total, limit, offset, runs }`, newest first.
 * Technicians get their own runs only (assigned, signed in, or handed over to them); the other roles all.
 */
export const GET = async (event) => {
	const user = requireRole(event, ...runService.READ_ROLES);
	const parsed = parseQuery(event.url, runListQuerySchema);
	if (parsed.response) return parsed.response;
	return json(await listRuns(event.locals.em, user, parsed.data), { headers: { 'cache-control': 'no-store' } });
};
