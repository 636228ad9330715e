import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { parseJsonBody } from '$lib/server/registers-json';
import { RELEASE_ROLES, releaseJob, releaseSchema } from '$lib/server/services/release.service';
import { answer } from '$lib/server/quality-json';

/** `{ pin }` → 200 `{ jobNumber }` once every run on the job is released; 409 `{ message, reasons }` otherwise. */
export const POST = async (event) => {
	const user = requireRole(event, ...RELEASE_ROLES);
	const parsed = await parseJsonBody(event.request, releaseSchema);
	if (parsed.response) return parsed.response;
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) return json({ message: 'No such job.' }, { status: 404 });
	return answer(await releaseJob(event.locals.em, user, id.data, parsed.data));
};
