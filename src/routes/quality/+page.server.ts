import { requireRole } from '$lib/server/access';
import { openFindings, reviewQueue } from '$lib/server/services/audit.service';

/** The quality home: runs to review, runs under way, and the findings that wait for a disposition. */
export const load = async (event) => {
	requireRole(event, 'quality');
	const em = event.locals.em;
	const [queue, findings] = await Promise.all([reviewQueue(em.fork()), openFindings(em.fork())]);
	return { queue, findings };
};
