import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

/**
 * One signed-in browser. Its id travels in the session JWT; signing out revokes this row, so a copied cookie
 * stops working at once instead of living until the token expires.
 */
export const UserSession = defineEntity({
	name: 'UserSession',
	tableName: 'user_session',
	properties: {
		id: p.uuid().primary(),
		userId: p.uuid().index(),
		createdAt: p.datetime().onCreate(() => new Date()),
		expiresAt: p.datetime(),
		revokedAt: p.datetime().nullable(),
		userAgent: p.string().length(300).nullable(),
		address: p.string().length(64).nullable()
	}
});
export type IUserSession = InferEntity<typeof UserSession>;
