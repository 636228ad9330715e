import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './user.entity';

/**
 * A procedure of the shop's library: the stable identity its versions and its one open draft hang on.
 * `title` and `family` mirror the latest published version (or the draft while nothing is published) for the table.
 */
export const Procedure = defineEntity({
	name: 'Procedure',
	tableName: 'procedure',
	properties: {
		id: p.uuid().primary(),
		slug: p.string().length(64).unique(),
		title: p.string().length(200),
		family: p.string().length(200),
		createdBy: () => p.manyToOne(User),
		createdAt: p.datetime().onCreate(() => new Date()),
		/** Last change of any kind (draft saved, submitted, published, retired), for "last change" in the library. */
		changedAt: p.datetime().onCreate(() => new Date()),
		changedBy: () => p.manyToOne(User).nullable()
	}
});
export type IProcedure = InferEntity<typeof Procedure>;
