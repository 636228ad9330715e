import { navFor } from '$lib/navigation';
import { isDemo } from '$lib/server/env';

export const load = ({ locals }) => {
	const user = locals.user;
	return {
		user: user && { id: user.id, name: user.name, email: user.email, roles: user.roles },
		nav: user ? navFor(user.roles, isDemo()) : [],
		demo: isDemo()
	};
};
