import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { PART_CATEGORIES } from '$lib/registers/parts';
import { partSchema } from '$lib/registers/schema';
import { requireRole } from '$lib/server/access';
import { parseJsonBody, parseQuery, refusal } from '$lib/server/registers-json';
import * as parts from '$lib/server/repositories/parts';
import * as partService from '$lib/server/services/parts.service';

const querySchema = z.object({
	q: z.string().trim().max(100).optional(),
	category: z.enum(PART_CATEGORIES).optional(),
	/** Exact part number: answers its lots too (what a part or fluid checkpoint offers). */
	partNumber: z.string().trim().max(40).optional()
});

export const GET = async (event) => {
	requireRole(event, ...REGISTER_ROLES.readParts);
	const parsedQuery = parseQuery(event.url, querySchema);
	if (parsedQuery.response) return parsedQuery.response;
	const q = parsedQuery.data;
	if (q.partNumber) {
		const part = await parts.findByPartNumber(event.locals.em, q.partNumber);
		return json({
			parts: part ? [parts.toPartSummary(part)] : [],
			lots: part ? await parts.lotsForPartNumber(event.locals.em, part.partNumber) : []
		});
	}
	return json({ parts: (await parts.listParts(event.locals.em, q)).map(parts.toPartSummary) });
};

export const POST = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.edit);
	const parsedBody = await parseJsonBody(event.request, partSchema);
	if (parsedBody.response) return parsedBody.response;
	const input = parsedBody.data;
	const result = await partService.createPart(event.locals.em, user, input);
	if (!result.ok) return refusal(result);
	return json(result.value, { status: 201 });
};
