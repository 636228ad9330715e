import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { parseQuery } from '$lib/server/registers-json';
import { findingsQuerySchema } from '$lib/server/services/dispositions.schema';
import { DISPOSITION_ROLES, listFindings } from '$lib/server/services/dispositions.service';

/** `?status=open|all` (default open): findings newest first, each with its disposition when it has one. */
export const GET = async (event) => {
	requireRole(event, ...DISPOSITION_ROLES);
	const q = parseQuery(event.url, findingsQuerySchema);
	if (q.response) return q.response;
	const findings = await listFindings(event.locals.em, q.data.status);
	return json({ findings, count: findings.length }, { headers: { 'cache-control': 'no-store' } });
};
