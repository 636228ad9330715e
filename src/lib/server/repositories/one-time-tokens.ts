import type { EntityManager } from '@mikro-orm/postgresql';
import { OneTimeToken, type IOneTimeToken, type IUser, type TokenPurpose } from '../db/entities';

export function create(
	em: EntityManager,
	user: IUser,
	purpose: TokenPurpose,
	tokenHash: string,
	ttlMs: number
): IOneTimeToken {
	return em.create(OneTimeToken, {
		id: crypto.randomUUID(),
		user,
		purpose,
		tokenHash,
		expiresAt: new Date(Date.now() + ttlMs)
	});
}

export function findByHash(em: EntityManager, tokenHash: string): Promise<IOneTimeToken | null> {
	return em.findOne(OneTimeToken, { tokenHash }, { populate: ['user'] });
}

/**
 * Marks a token used only if it is still unused, in one UPDATE, so two concurrent uses cannot both succeed.
 * Returns whether this call consumed it.
 */
export async function consume(em: EntityManager, id: string): Promise<boolean> {
	const n = await em.nativeUpdate(
		OneTimeToken,
		{ id, usedAt: null, expiresAt: { $gt: new Date() } },
		{ usedAt: new Date() }
	);
	return n === 1;
}

/** Voids every open link of one purpose for a user, e.g. when a new reset is started. */
export function voidOpen(em: EntityManager, userId: string, purpose: TokenPurpose): Promise<number> {
	return em.nativeUpdate(OneTimeToken, { user: userId, purpose, usedAt: null }, { usedAt: new Date() });
}
