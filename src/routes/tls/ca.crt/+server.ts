import { error } from '@sveltejs/kit';
import { shopCa } from '$lib/server/services/devices-tls';

/** `GET /tls/ca.crt`: the shop CA certificate (PEM) for tablets to install; public, 404 when there is none. */
export const GET = async () => {
	const ca = await shopCa();
	if (!ca) error(404, 'This server is not using a shop certificate authority.');
	return new Response(ca.pem, {
		headers: {
			'content-type': 'application/x-x509-ca-cert',
			'content-disposition': 'attachment; filename="benchstamp-shop-ca.crt"',
			'cache-control': 'no-cache',
			'x-content-type-options': 'nosniff'
		}
	});
};
