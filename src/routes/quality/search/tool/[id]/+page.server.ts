import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { AUDIT_ROLES, suspectTool, suspectToolSchema } from '$lib/server/services/search.service';

/** Suspect tool: every run signed with the tool since its last good calibration (same answer as the JSON route). */
export const load = async (event) => {
	requireRole(event, ...AUDIT_ROLES);
	const parsed = suspectToolSchema.safeParse({ toolId: event.params.id });
	if (!parsed.success) error(404, 'No such tool.');
	const answer = await suspectTool(event.locals.em, parsed.data.toolId);
	if (!answer) error(404, 'No such tool.');
	return { answer };
};
