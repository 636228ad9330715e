/**
 * The runner's photo capture: every picture is shrunk on the tablet first (offline-photo.ts), then uploaded to
 * `POST /api/images` as a run photo. When the server cannot be reached (not a refusal) the shrunk photo is kept on
 * the tablet instead and handed to the form as taken; it uploads after its record is synced.
 */
import { keepOnTablet, shrinkPhoto } from '$lib/client/offline-photo';
import { tabletStore } from '$lib/client/tablet-store';

export interface UploadedPhoto {
	id: string;
	url: string;
	/** Kept on this tablet: the record that names it must declare it in `tabletPhotos` (see offline-photo.ts). */
	kept?: boolean;
}

export type PhotoResult = { ok: true; photo: UploadedPhoto } | { ok: false; message: string };

/** The note shown beside a photo kept on the tablet. */
export const KEPT_NOTE = 'Kept on this tablet; it uploads after the record is synced';

type Upload = PhotoResult | { ok: false; unreachable: true; message: string };

export async function uploadRunPhoto(file: Blob, filename = 'photo.jpg'): Promise<Upload> {
	const form = new FormData();
	form.set('purpose', 'finding');
	form.set('file', file, filename);
	let res: Response;
	try {
		res = await fetch('/api/images', { method: 'POST', body: form });
	} catch {
		return { ok: false, unreachable: true, message: 'The server could not be reached.' };
	}
	const body = (await res.json().catch(() => null)) as { id?: string; url?: string; message?: string } | null;
	if (res.status === 201 && body?.id && body.url) return { ok: true, photo: { id: body.id, url: body.url } };
	return { ok: false, message: body?.message ?? `The photo was not stored (the server answered ${res.status}).` };
}

/** Shrinks, then uploads, or keeps the photo on the tablet when the server cannot be reached. */
export async function captureRunPhoto(file: File): Promise<PhotoResult> {
	let shrunk: Blob;
	try {
		shrunk = await shrinkPhoto(file);
	} catch {
		return {
			ok: false,
			message: 'This tablet cannot read the photo (JPEG, PNG or WebP). Take it again with the camera.'
		};
	}
	const name = (file.name.replace(/\.[^.]*$/, '') || 'photo') + '.jpg';
	const uploaded = await uploadRunPhoto(shrunk, name);
	if (uploaded.ok || !('unreachable' in uploaded)) return uploaded;
	try {
		const kept = await keepOnTablet(await tabletStore(), shrunk);
		return { ok: true, photo: { id: kept.id, url: kept.url, kept: true } };
	} catch {
		return {
			ok: false,
			message: 'The server could not be reached and the photo could not be kept on this tablet. Try again.'
		};
	}
}
