import { customerRecordByToken } from '$lib/server/services/customer-record.service';

/** Public: the customer's rebuild record behind an expiring link (no sign-in; the token is the key). */
export const load = async ({ locals, params, setHeaders }) => {
	setHeaders({ 'Cache-Control': 'no-store', 'Referrer-Policy': 'no-referrer' });
	const found = await customerRecordByToken(locals.em, params.token);
	const record = found.status === 'ok' ? found.record : null;
	return { status: found.status, record, token: params.token };
};
