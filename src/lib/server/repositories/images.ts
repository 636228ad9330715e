import type { EntityManager } from '@mikro-orm/postgresql';
import { StoredImage, type ImagePurpose, type IStoredImage } from '../db/entities';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The image's row, or null — also for ids that are not uuids, so a bad link is a 404 and not a database error. */
export function findById(em: EntityManager, id: string): Promise<IStoredImage | null> {
	if (!UUID.test(id)) return Promise.resolve(null);
	return em.findOne(StoredImage, { id });
}

export function create(
	em: EntityManager,
	data: {
		id: string;
		storageKey: string;
		contentType: string;
		byteSize: number;
		width: number;
		height: number;
		sha256: string;
		purpose: ImagePurpose;
		originalName: string;
		uploadedById: string;
	}
): IStoredImage {
	const { uploadedById, ...rest } = data;
	return em.create(StoredImage, { ...rest, uploadedBy: uploadedById });
}
