import type { EntityManager } from '@mikro-orm/postgresql';
import type { SessionUser } from '$lib/server/session-user';

declare global {
	namespace App {
		interface Locals {
			/** One unit of work per request (`orm.em.fork()`). */
			em: EntityManager;
			/** The signed-in person, re-checked against the database on every request; null when anonymous. */
			user: SessionUser | null;
			/** The live `user_session` row behind the cookie, revoked at sign-out. */
			sessionId: string | null;
		}
		interface Error {
			message: string;
		}
		interface PageData {
			user?: { id: string; name: string; email: string; roles: string[] } | null;
		}
	}
}

export {};
