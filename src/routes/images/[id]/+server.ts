import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/access';
import { readImage } from '$lib/server/services/images.service';
import type { RequestHandler } from './$types';

/** A stored picture, for any signed-in person. Ids are random and contents never change, so caching is safe. */
export const GET: RequestHandler = async (event) => {
	requireUser(event);
	const image = await readImage(event.locals.em, event.params.id);
	if (!image) error(404, 'No such image.');
	const etag = `"${image.sha256}"`;
	const headers = {
		'Content-Type': image.contentType,
		'X-Content-Type-Options': 'nosniff',
		// private: never in a shared cache; a day, then revalidated by ETag (an inactive person then gets sign-in).
		'Cache-Control': 'private, max-age=86400',
		ETag: etag,
		'Content-Security-Policy': "default-src 'none'; sandbox",
		'Content-Disposition': 'inline'
	};
	if (event.request.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
	return new Response(image.body as Uint8Array<ArrayBuffer>, {
		headers: { ...headers, 'Content-Length': String(image.body.byteLength) }
	});
};
