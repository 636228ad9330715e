import { requireRole } from '$lib/server/access';

export const load = (event) => {
	requireRole(event, 'technician', 'lead');
	return {};
};
