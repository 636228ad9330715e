import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { requireRole } from '$lib/server/access';
import * as jobService from '$lib/server/services/jobs.service';

export const GET = async (event) => {
	requireRole(event, ...REGISTER_ROLES.readJobs);
	const id = z.uuid().safeParse(event.params.id);
	const detail = id.success ? await jobService.jobDetail(event.locals.em, id.data) : undefined;
	if (!detail) error(404, 'No such job.');
	return json(detail);
};
