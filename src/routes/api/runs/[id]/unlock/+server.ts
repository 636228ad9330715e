import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { parseJsonBody } from '$lib/server/registers-json';
import { unlockPin, unlockSchema } from '$lib/server/services/pin-unlock.service';
import { SUBMIT_ROLES } from '$lib/server/services/runs.service';

/**
 * A lead unlocks a person's signing on this tablet: `{ userId, deviceId, leadId, pin }` → 200 `{ unlocked }`.
 * Whoever is signed in on the tablet may send it (like the submit route): the lead's own PIN is the authority.
 * 400 bad input · 403 not a lead, own lock or wrong PIN · 404 no such run · 409 not locked.
 */
export const POST = async (event) => {
	const user = requireRole(event, ...SUBMIT_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such run.');
	const parsed = await parseJsonBody(event.request, unlockSchema);
	if (parsed.response) return parsed.response;
	const result = await unlockPin(event.locals.em, user, id.data, parsed.data);
	if (!result.ok) {
		if (result.status === 404) error(404, result.message);
		return json(
			{ message: result.message, errors: result.field ? { [result.field]: [result.message] } : {} },
			{ status: result.status }
		);
	}
	return json(result.value, { headers: { 'cache-control': 'no-store' } });
};
