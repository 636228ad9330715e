import { json } from '@sveltejs/kit';

/** A quality service's outcome as JSON: the value, or `{ message, reasons?, errors? }` with the refusal's status. */
export function answer<T>(
	r: { ok: true; value: T } | { ok: false; status: number; message: string; field?: string; reasons?: string[] },
	okStatus = 200
): Response {
	if (r.ok) return json(r.value, { status: okStatus });
	return json(
		{
			message: r.message,
			...(r.reasons && { reasons: r.reasons }),
			...(r.field && { errors: { [r.field]: [r.message] } })
		},
		{ status: r.status }
	);
}
