import type { EntityManager } from '@mikro-orm/postgresql';
import { User, type IUser, type Role } from '../../src/lib/server/db/entities';
import { hashSecret } from '../../src/lib/server/passwords';

let counter = 0;

/** The one place tests make people. Unique e-mails per call; password and PIN hashed as the app does. */
export async function makePerson(
	em: EntityManager,
	over: { roles?: Role[]; password?: string; pin?: string; active?: boolean; name?: string } = {}
): Promise<IUser> {
	counter += 1;
	const user = em.create(User, {
		id: crypto.randomUUID(),
		email: `person${counter}-${Date.now().toString(36)}@shop.example`,
		name: over.name ?? `Test Person ${counter}`,
		roles: over.roles ?? ['technician'],
		passwordHash: over.password ? await hashSecret(over.password) : null,
		pinHash: over.pin ? await hashSecret(over.pin) : null,
		active: over.active ?? true,
		sessionVersion: 1
	});
	await em.flush();
	return user;
}
