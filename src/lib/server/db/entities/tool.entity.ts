import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { TOOL_KINDS, TOOL_UNITS, type ToolKind, type ToolUnit } from '../../../registers/tool-kinds';

/**
 * A measuring or torque tool in the shop's register. Range, resolution and accuracy are decimal text as entered
 * (exact, no binary rounding); the unit applies to range and resolution.
 */
export const Tool = defineEntity({
	name: 'Tool',
	tableName: 'tool',
	properties: {
		id: p.uuid().primary(),
		assetTag: p.string().length(40).unique(),
		kind: p.enum([...TOOL_KINDS]).$type<ToolKind>(),
		description: p.string().length(200),
		rangeMin: p.string().length(24),
		rangeMax: p.string().length(24),
		unit: p.enum([...TOOL_UNITS]).$type<ToolUnit>(),
		resolution: p.string().length(24),
		accuracyPct: p.string().length(24),
		active: p.boolean().default(true),
		createdAt: p.datetime().onCreate(() => new Date()),
		updatedAt: p
			.datetime()
			.onCreate(() => new Date())
			.onUpdate(() => new Date())
	}
});
export type ITool = InferEntity<typeof Tool>;
