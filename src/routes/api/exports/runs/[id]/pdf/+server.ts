import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { EXPORT_ROLES, exportRunPdf } from '$lib/server/services/exports.service';

/**
 * The run record as a PDF. Each download anchors the chain head it prints and appends an `export` record holding the
 * sha256 of exactly these bytes (header `X-Benchstamp-Sha256`).
 */
export const GET = async (event) => {
	const user = requireRole(event, ...EXPORT_ROLES);
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) error(404, 'No such run.');
	const result = await exportRunPdf(event.locals.em, user, id.data);
	if (!result.ok) error(result.status, result.message);
	const { bytes, sha256, filename } = result.value;
	return new Response(new Uint8Array(bytes), {
		headers: {
			'Content-Type': 'application/pdf',
			'Content-Length': String(bytes.byteLength),
			'Content-Disposition': `attachment; filename="${filename}"`,
			'Cache-Control': 'no-store',
			'X-Content-Type-Options': 'nosniff',
			'X-Benchstamp-Sha256': sha256
		}
	});
};
