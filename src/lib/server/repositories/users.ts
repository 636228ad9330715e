import type { EntityManager } from '@mikro-orm/postgresql';
import { User, type IUser, type Role } from '../db/entities';

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

export function findById(em: EntityManager, id: string): Promise<IUser | null> {
	return em.findOne(User, { id });
}

export function findByEmail(em: EntityManager, email: string): Promise<IUser | null> {
	return em.findOne(User, { email: normaliseEmail(email) });
}

export function listAll(em: EntityManager): Promise<IUser[]> {
	return em.find(User, {}, { orderBy: { name: 'asc' } });
}

export function create(em: EntityManager, data: { email: string; name: string; roles: Role[] }): IUser {
	return em.create(User, {
		id: crypto.randomUUID(),
		email: normaliseEmail(data.email),
		name: data.name.trim(),
		roles: data.roles,
		active: true,
		sessionVersion: 1
	});
}
