import { shopCa } from '$lib/server/services/devices-tls';

/** Public: a tablet opens this before it trusts the server, so nobody is signed in yet. */
export const load = async (event) => {
	const ca = await shopCa();
	return {
		ca: ca && { fingerprint: ca.fingerprint, subject: ca.subject, validTo: ca.validTo },
		secure: event.url.protocol === 'https:'
	};
};
