import { redirect } from '@sveltejs/kit';
import { homeFor } from '$lib/accounts/schema';
import { requireUser } from '$lib/server/access';

export const load = (event) => {
	const user = requireUser(event);
	redirect(303, homeFor(user.roles));
};
