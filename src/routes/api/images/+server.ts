import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole, requireUser } from '$lib/server/access';
import { IMAGE_PURPOSES, IMAGE_UPLOAD_ROLES, MAX_IMAGE_BYTES, storeImage } from '$lib/server/services/images.service';
import { TOO_LARGE } from '$lib/server/images';
import type { RequestHandler } from './$types';

/** Room for the multipart boundaries and the purpose field around the file itself. */
const FORM_OVERHEAD = 64 * 1024;

const fields = z.object({
	purpose: z.enum(IMAGE_PURPOSES, { error: 'Say what the photo is for: procedure, intake or finding.' }),
	file: z.instanceof(File, { error: 'Choose a photo to upload.' })
});

const STATUS = { empty: 400, damaged: 400, too_large: 413, unsupported: 415 } as const;

/** Upload one picture: multipart/form-data with `file` and `purpose`. 201 { id, url, … } or 4xx { message }. */
export const POST: RequestHandler = async (event) => {
	const user = requireUser(event);
	// Refuse an oversized body before reading it (adapter-node's BODY_SIZE_LIMIT is the outer net).
	const declared = Number(event.request.headers.get('content-length') ?? 0);
	if (declared > MAX_IMAGE_BYTES + FORM_OVERHEAD) return json({ message: TOO_LARGE }, { status: 413 });

	let form: FormData;
	try {
		form = await event.request.formData();
	} catch {
		return json(
			{ message: 'Send the photo as multipart/form-data with the fields file and purpose.' },
			{ status: 400 }
		);
	}
	const purpose = z.enum(IMAGE_PURPOSES).safeParse(form.get('purpose'));
	if (!purpose.success)
		return json({ message: 'Say what the photo is for: procedure, intake or finding.' }, { status: 400 });
	requireRole(event, ...IMAGE_UPLOAD_ROLES[purpose.data]);

	const parsed = fields.safeParse({ purpose: purpose.data, file: form.get('file') });
	if (!parsed.success) return json({ message: parsed.error.issues[0].message }, { status: 400 });
	const file = parsed.data.file;
	if (file.size > MAX_IMAGE_BYTES) return json({ message: TOO_LARGE }, { status: 413 });

	const result = await storeImage(event.locals.em, user, {
		bytes: new Uint8Array(await file.arrayBuffer()),
		filename: file.name,
		purpose: parsed.data.purpose
	});
	if (!result.ok) return json({ message: result.message }, { status: STATUS[result.reason] });
	return json(result.value, { status: 201 });
};
