import { requireRole } from '$lib/server/access';
import { listRuns } from '$lib/server/services/run-list.service';

/** The bench: the runs this person works on (a technician's own runs; a lead's assigned runs) to take offline. */
export const load = async (event) => {
	const user = requireRole(event, 'technician', 'lead');
	const query = { limit: 50, offset: 0, ...(user.roles.includes('technician') ? {} : { assignedTo: user.id }) };
	const { runs } = await listRuns(event.locals.em, user, query);
	return {
		runs: runs
			.filter((r) => r.state === 'in_progress' || r.state === 'paused')
			.map((r) => ({
				id: r.id,
				jobNumber: r.jobNumber,
				title: r.title,
				versionNumber: r.versionNumber,
				state: r.state
			}))
	};
};
