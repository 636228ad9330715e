import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

export const ROLES = ['technician', 'lead', 'quality', 'admin'] as const;
export type Role = (typeof ROLES)[number];

/** A person who signs in. `sessionVersion` is copied into every JWT; bumping it revokes them all. */
export const User = defineEntity({
	name: 'User',
	tableName: 'app_user',
	properties: {
		id: p.uuid().primary(),
		email: p.string().length(320).unique(),
		name: p.string().length(120),
		roles: p.array<Role>().$type<Role[]>(),
		passwordHash: p.text().nullable(),
		pinHash: p.text().nullable(),
		active: p.boolean().default(true),
		sessionVersion: p.integer().default(1),
		pinChangedAt: p.datetime().nullable(),
		createdAt: p.datetime().onCreate(() => new Date()),
		updatedAt: p
			.datetime()
			.onCreate(() => new Date())
			.onUpdate(() => new Date())
	}
});
export type IUser = InferEntity<typeof User>;
