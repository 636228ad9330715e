import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Job } from './job.entity';

/** A stored image (the image pipeline's id, served at /images/<id>) attached to a job. */
export const JobPhoto = defineEntity({
	name: 'JobPhoto',
	tableName: 'job_photo',
	properties: {
		job: () => p.manyToOne(Job).primary().deleteRule('cascade'),
		imageId: p.string().length(64).primary(),
		addedById: p.uuid().nullable(),
		addedByName: p.string().length(120).nullable(),
		addedAt: p.datetime().onCreate(() => new Date())
	}
});
export type IJobPhoto = InferEntity<typeof JobPhoto>;
