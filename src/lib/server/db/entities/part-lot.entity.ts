import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Part } from './part.entity';

/** A lot (batch) or a single serial-numbered piece of a part, as received. */
export const PartLot = defineEntity({
	name: 'PartLot',
	tableName: 'part_lot',
	uniques: [{ properties: ['part', 'lotNumber'] }],
	properties: {
		id: p.uuid().primary(),
		part: () => p.manyToOne(Part).deleteRule('cascade'),
		lotNumber: p.string().length(60),
		serialised: p.boolean().default(false),
		/** Decimal text in the part's unit (exact). */
		quantity: p.string().length(24),
		receivedOn: p.date(),
		supplier: p.string().length(120).default(''),
		recordedById: p.uuid().nullable(),
		recordedByName: p.string().length(120).nullable(),
		recordedAt: p.datetime().onCreate(() => new Date())
	}
});
export type IPartLot = InferEntity<typeof PartLot>;
