import type { EntityManager } from '@mikro-orm/postgresql';
import { UserSession, type IUserSession } from '../db/entities';

export const SESSION_HOURS = 12;

export function open(
	em: EntityManager,
	data: { userId: string; userAgent: string | null; address: string | null }
): IUserSession {
	return em.create(UserSession, {
		id: crypto.randomUUID(),
		userId: data.userId,
		expiresAt: new Date(Date.now() + SESSION_HOURS * 3600_000),
		userAgent: data.userAgent?.slice(0, 300) ?? null,
		address: data.address?.slice(0, 64) ?? null
	});
}

/** Whether the session may still be used: present, not revoked, not expired, and the same person's. */
export async function isLive(em: EntityManager, id: string, userId: string): Promise<boolean> {
	const row = await em.findOne(UserSession, { id });
	return !!row && row.userId === userId && !row.revokedAt && row.expiresAt > new Date();
}

export function revoke(em: EntityManager, id: string): Promise<number> {
	return em.nativeUpdate(UserSession, { id, revokedAt: null }, { revokedAt: new Date() });
}
