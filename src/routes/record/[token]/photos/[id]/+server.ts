import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { customerMayViewPhoto } from '$lib/server/services/customer-record.service';
import { readImage } from '$lib/server/services/images.service';

/** A finding's photo for the customer: only while the link is open, and only photos of that run's findings. */
export const GET = async ({ locals, params }) => {
	const id = z.uuid().safeParse(params.id);
	if (!id.success || !(await customerMayViewPhoto(locals.em, params.token, id.data))) error(404, 'No such photo.');
	const image = await readImage(locals.em, id.data);
	if (!image) error(404, 'No such photo.');
	return new Response(image.body as Uint8Array<ArrayBuffer>, {
		headers: {
			'Content-Type': image.contentType,
			'Content-Length': String(image.body.byteLength),
			'X-Content-Type-Options': 'nosniff',
			'Cache-Control': 'private, no-store',
			'Content-Security-Policy': "default-src 'none'; sandbox",
			'Referrer-Policy': 'no-referrer'
		}
	});
};
