import { fail } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { demoSources } from '$lib/procedure/demo-sources';
import * as procedures from '$lib/server/repositories/procedures';
import * as svc from '$lib/server/services/procedures.service';

/** The table itself is fetched in the browser from GET /api/procedures. */
export const load = (event) => {
	const user = requireRole(event, 'technician', 'lead', 'quality', 'admin');
	return { canEdit: svc.may.edit(user), demoFiles: Object.keys(demoSources).sort() };
};

export const actions = {
	/** Empty library only: each demo file becomes a draft of this person, to be submitted and approved as usual. */
	importDemo: async (event) => {
		const user = requireRole(event, ...svc.EDIT_ROLES);
		if ((await procedures.count(event.locals.em)) > 0)
			return fail(400, {
				message: 'The library already has procedures; the demo files are offered only to an empty one.'
			});
		let created = 0;
		for (const source of Object.values(demoSources))
			if ((await svc.create(event.locals.em, user, source)).ok) created++;
		return { message: `${created} demo procedures imported as drafts. Open each, submit it, and have it approved.` };
	}
};
