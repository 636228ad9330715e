import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './user.entity';

/**
 * A training record: this person is qualified for this procedure family (or step qualification) from `trainedOn`
 * until `expiresOn` (inclusive; none = no expiry). Revoking keeps the row and sets `revokedAt`.
 */
export const Qualification = defineEntity({
	name: 'Qualification',
	tableName: 'qualification',
	properties: {
		id: p.uuid().primary(),
		user: () => p.manyToOne(User).deleteRule('cascade').index(),
		family: p.string().length(160),
		/** Lower-cased, whitespace-collapsed `family`, the key `isQualified` matches on. */
		familyKey: p.string().length(160).index(),
		trainedBy: p.string().length(120),
		trainedOn: p.date(),
		expiresOn: p.date().nullable(),
		notes: p.text().default(''),
		revokedAt: p.datetime().nullable(),
		recordedById: p.uuid().nullable(),
		recordedByName: p.string().length(120).nullable(),
		recordedAt: p.datetime().onCreate(() => new Date())
	}
});
export type IQualification = InferEntity<typeof Qualification>;
