import { fail, type RequestEvent } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import {
	CUSTOMER_RECORD_ROLES,
	customerRecordSchema,
	sendCustomerRecord
} from '$lib/server/services/customer-record.service';

/** The empty "send the customer record" form for the run record page. */
export const customerRecordForm = () => superValidate(zod4(customerRecordSchema), { id: 'customer-record' });

/** `?/sendRecord`: makes the expiring link and mails it to the job's customer. */
export async function sendRecordAction(event: RequestEvent) {
	const user = requireRole(event, ...CUSTOMER_RECORD_ROLES);
	const form = await superValidate(event.request, zod4(customerRecordSchema), { id: 'customer-record' });
	if (!form.valid) return fail(400, { customerForm: form });
	const id = z.uuid().safeParse(event.params.id);
	if (!id.success) return message(form, 'No such run.', { status: 404 });
	const result = await sendCustomerRecord(event.locals.em, user, id.data, {
		days: form.data.days,
		origin: event.url.origin
	});
	if (!result.ok) return message(form, result.message, { status: result.status });
	return message(
		form,
		`The rebuild record was e-mailed to the customer; the link works until ${result.value.expiresAt.slice(0, 10)}.`
	);
}
