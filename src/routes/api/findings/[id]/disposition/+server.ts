import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { parseJsonBody } from '$lib/server/registers-json';
import { dispositionSchema } from '$lib/server/services/dispositions.schema';
import { DISPOSITION_ROLES, dispose } from '$lib/server/services/dispositions.service';
import { answer } from '$lib/server/quality-json';

/**
 * `{ decision, justification, steps, assignedToId, pin }` → 201 `{ recordId, reworkRunId }`; 400 with field messages,
 * 403 (own work), 404, 409 (already decided, run released) with `{ message }`.
 */
export const POST = async (event) => {
	const user = requireRole(event, ...DISPOSITION_ROLES);
	const parsed = await parseJsonBody(event.request, dispositionSchema);
	if (parsed.response) return parsed.response;
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) return json({ message: 'No such finding.' }, { status: 404 });
	return answer(await dispose(event.locals.em, user, id.data, parsed.data), 201);
};
