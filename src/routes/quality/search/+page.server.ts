import { requireRole } from '$lib/server/access';
import { AUDIT_ROLES, searchOptions } from '$lib/server/services/search.service';

/** Search across runs: the filter choices. The table itself comes from `GET /api/audit/runs`. */
export const load = async (event) => {
	requireRole(event, ...AUDIT_ROLES);
	return searchOptions(event.locals.em);
};
