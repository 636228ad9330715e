import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { requireRole } from '$lib/server/access';
import * as tools from '$lib/server/repositories/tools';

export const GET = async (event) => {
	requireRole(event, ...REGISTER_ROLES.readTools);
	const id = z.uuid().safeParse(event.params.id);
	const tool = id.success ? await tools.findSummary(event.locals.em, id.data) : null;
	if (!tool) error(404, 'No such tool.');
	const records = await tools.listCalibrations(event.locals.em, tool.id);
	return json({ tool, calibrations: records.map(tools.toCalibrationRecord) });
};
