import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as audit from '$lib/server/services/audit.service';

/**
 * Verifies every run's chain against its anchors: counts, each failing run's first bad record, and the job number
 * of each failing run (`jobs`, by run id) so the answer can name the unit.
 */
export const POST = async (event) => {
	requireRole(event, ...audit.VERIFY_ROLES);
	const result = await audit.verifyAll(event.locals.em);
	const jobs = await audit.jobNumbersOf(
		event.locals.em,
		result.failures.map((f) => f.runId)
	);
	return json({ ...result, jobs });
};
