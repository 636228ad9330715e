import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './user.entity';

export const IMAGE_PURPOSES = ['procedure', 'intake', 'finding'] as const;
export type ImagePurpose = (typeof IMAGE_PURPOSES)[number];

/**
 * A picture kept in object storage: the processed (re-encoded, metadata-free) bytes live under `storageKey`,
 * this row says what they are. Rows are never changed after the upload.
 */
export const StoredImage = defineEntity({
	name: 'StoredImage',
	tableName: 'stored_image',
	properties: {
		id: p.uuid().primary(),
		storageKey: p.string().length(200).unique(),
		contentType: p.string().length(64),
		byteSize: p.integer(),
		width: p.integer(),
		height: p.integer(),
		/** Hex sha256 of the stored bytes; checked on every read. */
		sha256: p.string().length(64),
		purpose: p.enum([...IMAGE_PURPOSES]).$type<ImagePurpose>(),
		/** The name the file had on the uploader's device, for display only; never used to decide the type. */
		originalName: p.string().length(200),
		uploadedBy: () => p.manyToOne(User),
		createdAt: p.datetime().onCreate(() => new Date())
	}
});
export type IStoredImage = InferEntity<typeof StoredImage>;
