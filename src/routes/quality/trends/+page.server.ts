import { requireRole } from '$lib/server/access';
import { AUDIT_ROLES } from '$lib/server/services/search.service';
import { trendProcedures } from '$lib/server/services/trends.service';

/** Trends: the procedures to choose from. Readings, indices and rates come from `GET /api/audit/trends`. */
export const load = async (event) => {
	requireRole(event, ...AUDIT_ROLES);
	return { procedures: await trendProcedures(event.locals.em) };
};
