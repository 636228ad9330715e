import { createHash, randomBytes } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '$lib/accounts/schema';
import type { ImagePurpose } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as images from '../repositories/images';
import { MAX_IMAGE_BYTES, processImage, type ImageRefusal } from '../images';
import { objectStore } from '../storage';

export type { ImagePurpose } from '../db/entities';
export { IMAGE_PURPOSES } from '../db/entities';
export { MAX_IMAGE_BYTES };

/** Who may upload a picture for what. Reading any stored picture needs only a signed-in person. */
export const IMAGE_UPLOAD_ROLES: Record<ImagePurpose, RoleName[]> = {
	procedure: ['lead', 'admin'],
	intake: ['lead', 'admin', 'technician'],
	finding: ['technician', 'lead', 'quality']
};

export interface StoredImageInfo {
	id: string;
	/** Where the app serves it (role-checked): `/images/<id>`. */
	url: string;
	width: number;
	height: number;
	/** Size of the stored (re-encoded) bytes. */
	bytes: number;
	contentType: string;
}

export type StoreImageResult =
	{ ok: true; value: StoredImageInfo } | { ok: false; message: string; reason: ImageRefusal['reason'] };

export const imageUrl = (id: string) => `/images/${id}`;
const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

/** A display name only: path parts and control characters dropped, length capped. */
function cleanName(filename: string): string {
	const base = filename.split(/[\\/]/).pop() ?? '';
	// eslint-disable-next-line no-control-regex
	const clean = base.replace(/[\u0000-\u001f\u007f]/g, '').trim();
	return (clean || 'photo').slice(0, 200);
}

/**
 * Checks a picture by its content, strips its metadata, re-encodes it and keeps it in object storage; the row is
 * written only after the object is stored, and the object is removed again if the row cannot be written, so a
 * refusal or a failure leaves nothing behind. Role checks are the caller's (see IMAGE_UPLOAD_ROLES).
 * Each upload writes an `image.uploaded` admin-log entry in the same unit of work.
 */
export async function storeImage(
	em: EntityManager,
	actor: { id: string; name: string },
	input: { bytes: Uint8Array; filename: string; purpose: ImagePurpose }
): Promise<StoreImageResult> {
	const processed = await processImage(input.bytes);
	if (!processed.ok) return { ok: false, message: processed.message, reason: processed.reason };

	const id = crypto.randomUUID();
	const storageKey = `images/${randomBytes(16).toString('hex')}.jpg`;
	const store = objectStore();
	await store.put(storageKey, processed.bytes, processed.contentType);
	try {
		const row = images.create(em, {
			id,
			storageKey,
			contentType: processed.contentType,
			byteSize: processed.bytes.byteLength,
			width: processed.width,
			height: processed.height,
			sha256: sha256(processed.bytes),
			purpose: input.purpose,
			originalName: cleanName(input.filename),
			uploadedById: actor.id
		});
		adminLog.append(em, actor, {
			action: 'image.uploaded',
			subjectType: 'image',
			subjectId: id,
			detail: { purpose: input.purpose, bytes: row.byteSize, width: row.width, height: row.height }
		});
		await em.flush();
	} catch (e) {
		await store.delete(storageKey).catch(() => {});
		throw e;
	}
	return {
		ok: true,
		value: {
			id,
			url: imageUrl(id),
			width: processed.width,
			height: processed.height,
			bytes: processed.bytes.byteLength,
			contentType: processed.contentType
		}
	};
}

/** A stored picture's bytes, or undefined for an unknown id. Throws if the object no longer matches its hash. */
export async function readImage(
	em: EntityManager,
	id: string
): Promise<{ body: Uint8Array; contentType: string; sha256: string } | undefined> {
	const row = await images.findById(em, id);
	if (!row) return undefined;
	const body = await objectStore().get(row.storageKey);
	if (!body) throw new Error(`Image ${row.id}: its object ${row.storageKey} is missing from the bucket.`);
	if (sha256(body) !== row.sha256) throw new Error(`Image ${row.id}: the stored object does not match its sha256.`);
	return { body, contentType: row.contentType, sha256: row.sha256 };
}

/** The picture's description without its bytes, for pages that list pictures. */
export async function describeImage(
	em: EntityManager,
	id: string
): Promise<(StoredImageInfo & { purpose: ImagePurpose; originalName: string; createdAt: Date }) | undefined> {
	const row = await images.findById(em, id);
	if (!row) return undefined;
	return {
		id: row.id,
		url: imageUrl(row.id),
		width: row.width,
		height: row.height,
		bytes: row.byteSize,
		contentType: row.contentType,
		purpose: row.purpose,
		originalName: row.originalName,
		createdAt: row.createdAt
	};
}
