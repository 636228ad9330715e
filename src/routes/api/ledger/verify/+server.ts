import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as audit from '$lib/server/services/audit.service';

/** Verifies every run's chain against its anchors: counts, and each failing run's first bad record. */
export const POST = async (event) => {
	requireRole(event, ...audit.VERIFY_ROLES);
	return json(await audit.verifyAll(event.locals.em));
};
