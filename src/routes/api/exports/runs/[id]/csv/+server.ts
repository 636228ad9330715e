import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { EXPORT_ROLES, exportRunCsv } from '$lib/server/services/exports.service';

/** The run record's readings as CSV (spreadsheet formulas neutralised). */
export const GET = async (event) => {
	requireRole(event, ...EXPORT_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such run.');
	const result = await exportRunCsv(event.locals.em, id.data);
	if (!result.ok) error(result.status, result.message);
	return new Response(result.value.csv, {
		headers: {
			'Content-Type': 'text/csv; charset=utf-8',
			'Content-Disposition': `attachment; filename="${result.value.filename}"`,
			'Cache-Control': 'no-store',
			'X-Content-Type-Options': 'nosniff'
		}
	});
};
