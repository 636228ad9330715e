import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { parseQuery } from '$lib/server/registers-json';
import { AUDIT_ROLES, runSearchSchema, searchRuns } from '$lib/server/services/search.service';

/**
 * Search across runs: `?signer=&procedure=&version=&from=&to=&findings=yes|no&serial=&lot=&state=&sort=&dir=&limit=
 * &offset=` → `{ total, limit, offset, sort, dir, runs }`; 400 with a message per field for bad input.
 */
export const GET = async (event) => {
	requireRole(event, ...AUDIT_ROLES);
	const parsed = parseQuery(event.url, runSearchSchema);
	if (parsed.response) return parsed.response;
	return json(await searchRuns(event.locals.em, parsed.data));
};
