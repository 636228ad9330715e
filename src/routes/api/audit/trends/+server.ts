import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { parseQuery } from '$lib/server/registers-json';
import { AUDIT_ROLES } from '$lib/server/services/search.service';
import { trends, trendsQuerySchema } from '$lib/server/services/trends.service';

/** `?procedure=&checkpoint=`: readings against limits with Pp/Ppk, step times, finding and comeback rates. */
export const GET = async (event) => {
	requireRole(event, ...AUDIT_ROLES);
	const parsed = parseQuery(event.url, trendsQuerySchema);
	if (parsed.response) return parsed.response;
	const answer = await trends(event.locals.em, parsed.data);
	if (!answer) error(404, 'No such procedure.');
	return json(answer);
};
