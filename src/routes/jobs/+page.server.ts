import { REGISTER_ROLES } from '$lib/registers/access';
import { hasAnyRole, requireRole } from '$lib/server/access';

/** The table itself is fetched in the browser from /api/jobs. */
export const load = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.readJobs);
	return { canCreate: hasAnyRole(user, REGISTER_ROLES.edit) };
};
