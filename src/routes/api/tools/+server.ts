import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { isRealDate } from '$lib/registers/dates';
import { toolSchema } from '$lib/registers/schema';
import { TOOL_KINDS } from '$lib/registers/tool-kinds';
import { requireRole } from '$lib/server/access';
import { parseJsonBody, parseQuery, refusal } from '$lib/server/registers-json';
import * as tools from '$lib/server/repositories/tools';
import * as toolService from '$lib/server/services/tools.service';

const querySchema = z.object({
	kind: z.enum(TOOL_KINDS).optional(),
	/** `1`: only the tools that may be chosen when signing. */
	usable: z.enum(['0', '1']).default('0'),
	/** ISO date the status is computed for (default today). */
	on: z.string().refine(isRealDate, 'Use YYYY-MM-DD.').optional()
});

export const GET = async (event) => {
	requireRole(event, ...REGISTER_ROLES.readTools);
	const parsedQuery = parseQuery(event.url, querySchema);
	if (parsedQuery.response) return parsedQuery.response;
	const q = parsedQuery.data;
	const opts = { kind: q.kind, at: q.on ? new Date(`${q.on}T12:00:00Z`) : undefined };
	const list =
		q.usable === '1'
			? await tools.findUsable(event.locals.em, opts)
			: await tools.listWithStatus(event.locals.em, opts);
	return json({ tools: list });
};

export const POST = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.edit);
	const parsedBody = await parseJsonBody(event.request, toolSchema);
	if (parsedBody.response) return parsedBody.response;
	const input = parsedBody.data;
	const result = await toolService.registerTool(event.locals.em, user, input);
	if (!result.ok) return refusal(result);
	return json(result.value, { status: 201 });
};
