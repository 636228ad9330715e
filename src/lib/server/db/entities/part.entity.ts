import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { PART_CATEGORIES, type PartCategory } from '../../../registers/parts';

/** A part number the shop stocks (filter, gasket, sensor, fluid…). */
export const Part = defineEntity({
	name: 'Part',
	tableName: 'part',
	properties: {
		id: p.uuid().primary(),
		partNumber: p.string().length(40).unique(),
		description: p.string().length(200),
		category: p.enum([...PART_CATEGORIES]).$type<PartCategory>(),
		/** Unit the lot quantities count in: `ea` for pieces, `L` for fluid. */
		unit: p.string().length(8),
		createdAt: p.datetime().onCreate(() => new Date())
	}
});
export type IPart = InferEntity<typeof Part>;
