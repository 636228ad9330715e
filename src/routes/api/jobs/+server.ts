import { json } from '@sveltejs/kit';
import { REGISTER_ROLES } from '$lib/registers/access';
import { jobSchema, jobsQuerySchema } from '$lib/registers/schema';
import { requireRole } from '$lib/server/access';
import { parseJsonBody, parseQuery, refusal } from '$lib/server/registers-json';
import * as jobs from '$lib/server/repositories/jobs';
import * as jobService from '$lib/server/services/jobs.service';

/** The jobs table: `?q=&state=(a state|open)&comebacks=1&limit=&offset=`. */
export const GET = async (event) => {
	requireRole(event, ...REGISTER_ROLES.readJobs);
	const parsedQuery = parseQuery(event.url, jobsQuerySchema);
	if (parsedQuery.response) return parsedQuery.response;
	const query = parsedQuery.data;
	const { rows, total } = await jobs.list(event.locals.em, query);
	return json({ total, limit: query.limit, offset: query.offset, jobs: rows.map(jobService.toSummary) });
};

/** Opens a job from a JSON body (the intake page posts a form with photos instead). */
export const POST = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.edit);
	const parsedBody = await parseJsonBody(event.request, jobSchema);
	if (parsedBody.response) return parsedBody.response;
	const input = parsedBody.data;
	const result = await jobService.openJob(event.locals.em, user, input);
	if (!result.ok) return refusal(result);
	return json(result.value, { status: 201 });
};
