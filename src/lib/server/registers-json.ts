import { json } from '@sveltejs/kit';
import type { z } from 'zod';

/** Field messages of a failed zod parse, keyed by field path: `{ assetTag: ['…'] }`. */
export function fieldErrors(issues: readonly z.core.$ZodIssue[]): Record<string, string[]> {
	const out: Record<string, string[]> = {};
	for (const i of issues) (out[i.path.join('.') || '_'] ??= []).push(i.message);
	return out;
}

export type Parsed<T> = { data: T; response?: undefined } | { data?: undefined; response: Response };

/** Parses a JSON request body with `schema`; a body that is not JSON or does not match gives a 400 answer. */
export async function parseJsonBody<S extends z.ZodType>(request: Request, schema: S): Promise<Parsed<z.output<S>>> {
	let body: unknown;
	try {
		body = await request.json();
	} catch {
		return { response: badRequest({}, 'Send a JSON body.') };
	}
	const parsed = schema.safeParse(body);
	return parsed.success ? { data: parsed.data } : { response: badRequest(fieldErrors(parsed.error.issues)) };
}

/** Parses URL query parameters with `schema` (a 400 answer with messages when they do not match). */
export function parseQuery<S extends z.ZodType>(url: URL, schema: S): Parsed<z.output<S>> {
	const parsed = schema.safeParse(Object.fromEntries(url.searchParams));
	return parsed.success ? { data: parsed.data } : { response: badRequest(fieldErrors(parsed.error.issues)) };
}

export const badRequest = (errors: Record<string, string[]>, message = 'Some fields need attention.') =>
	json({ message, errors }, { status: 400 });

/** A service refusal as a JSON answer: 400 with the message under its field when it names one. */
export const refusal = (r: { message: string; field?: string }) =>
	badRequest(r.field ? { [r.field]: [r.message] } : {}, r.message);
