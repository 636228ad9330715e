import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { parseJsonBody } from '$lib/server/registers-json';
import { submitBatchSchema } from '$lib/server/services/runs.schema';
import { SUBMIT_ROLES } from '$lib/server/services/runs.service';
import { submitRecords } from '$lib/server/services/submit.service';

/**
 * The one submit route: `{ records: [...], pins?: { [signerId]: pin } }` → 200
 * `{ answers: [{ id, status: 'accepted'|'duplicate'|'refused', reason?, seq?, hash?, findings? }], serverTime }`,
 * one answer per record in input order. A malformed batch is 400; an unknown (or not visible) run 404.
 */
export const POST = async (event) => {
	const user = requireRole(event, ...SUBMIT_ROLES);
	const parsed = await parseJsonBody(event.request, submitBatchSchema);
	if (parsed.response) return parsed.response;
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such run.');
	const result = await submitRecords(event.locals.em, user, id.data, parsed.data);
	if (!result.ok) error(result.status, result.message);
	return json(result.value, { headers: { 'cache-control': 'no-store' } });
};
