import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './user.entity';

export const TOKEN_PURPOSES = ['invite', 'password_reset', 'pin_reset'] as const;
export type TokenPurpose = (typeof TOKEN_PURPOSES)[number];

/** Single-use, expiring link token. Only its sha256 is stored, so a database read cannot replay a link. */
export const OneTimeToken = defineEntity({
	name: 'OneTimeToken',
	tableName: 'one_time_token',
	properties: {
		id: p.uuid().primary(),
		user: () => p.manyToOne(User).deleteRule('cascade'),
		purpose: p.enum([...TOKEN_PURPOSES]).$type<TokenPurpose>(),
		tokenHash: p.string().length(64).unique(),
		expiresAt: p.datetime(),
		usedAt: p.datetime().nullable(),
		createdAt: p.datetime().onCreate(() => new Date())
	}
});
export type IOneTimeToken = InferEntity<typeof OneTimeToken>;
