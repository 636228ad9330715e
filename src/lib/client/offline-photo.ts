/**
 * Run photos on the tablet (issue 7): every photo is shrunk here before it is stored or sent (less to carry over
 * shop Wi-Fi; the re-encode also drops EXIF/GPS), and a photo taken while the server cannot be reached is kept in
 * the offline store until its record is synced, then sent with {@link uploadOutboxPhoto}.
 *
 * Browser-only. The store parts also run on fake-indexeddb in unit tests.
 */
import { uuidv7 } from '$lib/ledger/uuid-v7';
import { KEYS, type OfflineStore } from './offline-store';
import type { PhotoAnswer, PhotoInput, PhotoItem } from './outbox';

/** Long edge of a photo after shrinking on the tablet: a part number stays readable on the quality lead's screen. */
export const SHRINK_MAX_EDGE = 1600;
/** JPEG quality of the tablet's re-encode. */
export const SHRINK_QUALITY = 0.85;

/** A photo kept on the tablet, under `KEYS.kept(id)`, until a record names it. */
export interface KeptPhoto {
	id: string;
	sha256: string;
	blob: Blob;
	keptAt: number;
}

/** The size to draw at: the long edge scaled down to `maxEdge` (never up), each side at least 1 px. */
export function fitWithin(width: number, height: number, maxEdge: number): { width: number; height: number } {
	const scale = Math.min(1, maxEdge / Math.max(width, height));
	return { width: Math.max(1, Math.round(width * scale)), height: Math.max(1, Math.round(height * scale)) };
}

/**
 * Decodes the photo (EXIF orientation applied), scales its long edge to at most `maxEdge` and re-encodes it as JPEG.
 * A canvas carries no metadata, so the result has no EXIF, GPS, XMP or IPTC. Throws when the browser cannot decode it.
 */
export async function shrinkPhoto(file: Blob, maxEdge = SHRINK_MAX_EDGE): Promise<Blob> {
	const bitmap = await createImageBitmap(file, { imageOrientation: 'from-image' });
	try {
		const { width, height } = fitWithin(bitmap.width, bitmap.height, maxEdge);
		if (typeof OffscreenCanvas !== 'undefined') {
			const canvas = new OffscreenCanvas(width, height);
			const ctx = canvas.getContext('2d');
			if (!ctx) throw new Error('This browser cannot draw the photo.');
			draw(ctx, bitmap, width, height);
			return await canvas.convertToBlob({ type: 'image/jpeg', quality: SHRINK_QUALITY });
		}
		const canvas = document.createElement('canvas');
		canvas.width = width;
		canvas.height = height;
		const ctx = canvas.getContext('2d');
		if (!ctx) throw new Error('This browser cannot draw the photo.');
		draw(ctx, bitmap, width, height);
		return await new Promise<Blob>((resolve, reject) =>
			canvas.toBlob(
				(b) => (b ? resolve(b) : reject(new Error('This browser could not encode the photo.'))),
				'image/jpeg',
				SHRINK_QUALITY
			)
		);
	} finally {
		bitmap.close();
	}
}

function draw(
	ctx: CanvasRenderingContext2D | OffscreenCanvasRenderingContext2D,
	bitmap: ImageBitmap,
	width: number,
	height: number
) {
	// A transparent PNG would turn black in a JPEG: flatten on white, as the server does.
	ctx.fillStyle = '#ffffff';
	ctx.fillRect(0, 0, width, height);
	ctx.imageSmoothingQuality = 'high';
	ctx.drawImage(bitmap, 0, 0, width, height);
}

/** Lower-case hex sha256 of the bytes (Web Crypto: HTTPS or localhost, which the tablet has). */
export async function sha256Hex(blob: Blob): Promise<string> {
	const digest = await crypto.subtle.digest('SHA-256', await blob.arrayBuffer());
	return Array.from(new Uint8Array(digest), (b) => b.toString(16).padStart(2, '0')).join('');
}

/** Keeps a (shrunk) photo on this tablet under a new uuid v7; `url` is a `blob:` URL to show it. */
export async function keepOnTablet(
	store: OfflineStore,
	blob: Blob,
	now = Date.now()
): Promise<{ id: string; sha256: string; url: string }> {
	const id = uuidv7();
	const sha256 = await sha256Hex(blob);
	const kept: KeptPhoto = { id, sha256, blob, keptAt: now };
	await store.set(KEYS.kept(id), kept);
	return { id, sha256, url: URL.createObjectURL(blob) };
}

/** Which of `ids` are photos kept on this tablet, in the order asked, as the outbox takes them. */
export async function keptPhotos(store: OfflineStore, ids: string[]): Promise<PhotoInput[]> {
	if (ids.length === 0) return [];
	const found = await store.getMany<KeptPhoto>(ids.map((id) => KEYS.kept(id)));
	return found.filter((k): k is KeptPhoto => !!k).map(({ id, sha256, blob }) => ({ id, sha256, blob }));
}

/** Forgets kept photos (once their record is in the outbox, or the photo was removed from the form). */
export async function dropKept(store: OfflineStore, ids: string[]): Promise<void> {
	if (ids.length === 0) return;
	await store.delMany(ids.map((id) => KEYS.kept(id)));
}

/** Statuses that mean "try again later" rather than "the server refused this photo". */
const RETRY_STATUSES = new Set([401, 408, 425, 429]);

/**
 * Sends one queued photo to `PUT /api/runs/:runId/photos/:id` (raw bytes). `stored` on success (also when the
 * server already had it); `refused` with the server's message on a 4xx; THROWS on a network error, a 5xx or a
 * signed-out session, so sync retries it with its backoff.
 */
export async function uploadOutboxPhoto(photo: PhotoItem, send: typeof fetch = fetch): Promise<PhotoAnswer> {
	const res = await send(`/api/runs/${encodeURIComponent(photo.runId)}/photos/${encodeURIComponent(photo.id)}`, {
		method: 'PUT',
		body: photo.blob,
		headers: { 'content-type': photo.blob.type || 'image/jpeg' },
		credentials: 'same-origin'
	});
	const body = (await res.json().catch(() => null)) as { status?: string; message?: string } | null;
	if (res.ok) return { status: 'stored' };
	if (res.status >= 500 || RETRY_STATUSES.has(res.status))
		throw new Error(body?.message ?? `The server answered ${res.status}; the photo will be sent again.`);
	return { status: 'refused', reason: body?.message ?? `The server refused the photo (${res.status}).` };
}
