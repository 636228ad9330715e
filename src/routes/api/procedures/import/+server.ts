import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { MAX_DOCUMENT_BYTES } from '$lib/procedure';
import { respond } from '../respond';

/**
 * Reads an uploaded `.md` file (multipart field `file`) and answers its text and problems; saves nothing, so the
 * problems are shown before the person decides to save it as a draft (POST /api/procedures).
 */
export const POST = async (event) => {
	requireRole(event, ...svc.EDIT_ROLES);
	const length = Number(event.request.headers.get('content-length') ?? 0);
	if (length > MAX_DOCUMENT_BYTES + 64_000)
		error(413, `The file is larger than the ${MAX_DOCUMENT_BYTES.toLocaleString('en')}-byte limit.`);
	const form = await event.request.formData().catch(() => null);
	const file = form?.get('file');
	if (!(file instanceof File)) error(400, 'Choose a .md file to import.');
	return respond(svc.readImport(new Uint8Array(await file.arrayBuffer()), file.name));
};
