import { error, json } from '@sveltejs/kit';
import type { z } from 'zod';
import type { Result } from '$lib/server/services/procedures.service';

/** A service result as a JSON response: the value, or `{ message, field?, problems? }` with the refusal's status. */
export function respond<T>(result: Result<T>, status = 200): Response {
	if (result.ok) return json(result.value, { status, headers: { 'cache-control': 'no-store' } });
	const { message, field, problems } = result;
	return json({ message, field, problems }, { status: result.status });
}

/** The JSON body validated by `schema`, or a 400 naming the first problem. */
export async function body<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
	let raw: unknown;
	try {
		raw = await request.json();
	} catch {
		error(400, 'Send a JSON body.');
	}
	const parsed = schema.safeParse(raw);
	if (!parsed.success) {
		const issue = parsed.error.issues[0];
		error(400, `${issue.path.join('.') || 'body'}: ${issue.message}`);
	}
	return parsed.data;
}

/** A version number from the path, or 404. */
export function versionNumber(raw: string): number {
	const n = Number(raw);
	if (!Number.isSafeInteger(n) || n < 1) error(404, 'No such version.');
	return n;
}
