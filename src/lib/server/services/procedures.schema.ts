// Shared by the JSON routes, the page actions and the browser. Relative imports only (the seed imports the service).
import { z } from 'zod';
import { MAX_DOCUMENT_BYTES } from '../../procedure/version';

/** Characters never outnumber UTF-8 bytes, so this caps the string before the service counts its bytes. */
export const sourceField = z
	.string({ error: 'Send the procedure source as text.' })
	.max(MAX_DOCUMENT_BYTES, `A procedure may be at most ${MAX_DOCUMENT_BYTES.toLocaleString('en')} bytes.`);

export const sourceSchema = z.object({ source: sourceField });

export const saveDraftSchema = z.object({
	source: sourceField,
	/** The `updatedAt` the editor last saw; a newer one on the server means someone else saved in between. */
	baseUpdatedAt: z.string().datetime().optional()
});

export const approveSchema = z.object({
	changeNote: z
		.string()
		.trim()
		.min(3, 'Say what changed and why (at least a few words).')
		.max(2000, 'Keep the change note under 2,000 characters.'),
	/** Content hash of the draft the approver read; refused if the draft changed since. */
	hash: z
		.string()
		.regex(/^[0-9a-f]{64}$/)
		.optional()
});

export const retireSchema = z.object({
	reason: z.string().trim().max(500, 'Keep the reason under 500 characters.').optional()
});

export const diffQuerySchema = z.object({
	from: z.union([z.coerce.number().int().positive(), z.literal('draft')]),
	to: z.union([z.coerce.number().int().positive(), z.literal('draft')])
});
