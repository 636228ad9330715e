import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { TOO_LARGE } from '$lib/server/images';
import { MAX_IMAGE_BYTES } from '$lib/server/services/images.service';
import { storeTabletPhoto, TABLET_PHOTO_ROLES } from '$lib/server/services/tablet-photos.service';

/**
 * A photo kept on a tablet, sent after the record that declared it (`body.tabletPhotos`): the raw image bytes as
 * the body. 200 `{ status: 'stored' }` (also when it is already stored), 4xx `{ message }`.
 */
export const PUT = async (event) => {
	const user = requireRole(event, ...TABLET_PHOTO_ROLES);
	const runId = z.uuid().safeParse(event.params.id);
	if (!runId.success) error(404, 'No such run.');
	const declared = Number(event.request.headers.get('content-length') ?? 0);
	if (declared > MAX_IMAGE_BYTES) return json({ message: TOO_LARGE }, { status: 413 });
	const bytes = new Uint8Array(await event.request.arrayBuffer());
	const result = await storeTabletPhoto(event.locals.em, user, {
		runId: runId.data,
		photoId: event.params.photoId,
		bytes
	});
	if (!result.ok) return json({ message: result.message }, { status: result.status });
	return json({ status: 'stored' }, { headers: { 'cache-control': 'no-store' } });
};
