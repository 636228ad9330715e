import type { RoleName } from '$lib/accounts/schema';

/** The plain view of the signed-in person that routes see; never an entity. */
export interface SessionUser {
	id: string;
	name: string;
	email: string;
	roles: RoleName[];
}
