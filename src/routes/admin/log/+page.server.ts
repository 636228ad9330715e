import { requireRole } from '$lib/server/access';
import * as adminLog from '$lib/server/repositories/admin-log';

export const load = async (event) => {
	requireRole(event, 'admin');
	const rows = await adminLog.latest(event.locals.em, 300);
	return {
		entries: rows.map((r) => ({
			id: r.id,
			at: r.at.toISOString(),
			actor: r.actorName ?? 'system',
			action: r.action,
			subject: `${r.subjectType} ${r.subjectId}`,
			detail: JSON.stringify(r.detail)
		}))
	};
};
