import { requireRole } from '$lib/server/access';

export const load = (event) => {
	requireRole(event, 'lead', 'quality', 'admin');
	return {};
};
