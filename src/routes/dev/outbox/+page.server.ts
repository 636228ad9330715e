import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { isDemo } from '$lib/server/env';
import { getRuntime } from '$lib/server/runtime';

export const load = async (event) => {
	// Exists only in demo/dev mode; a production server answers 404 as if the page did not exist.
	if (!isDemo()) error(404, 'Not found');
	requireRole(event, 'admin');
	const { readCapturedMail } = await import('$lib/server/fake-smtp');
	return { mails: await readCapturedMail(getRuntime().mailDir) };
};
