import { z } from 'zod';

const b64url32 = z
	.string()
	.regex(/^[A-Za-z0-9_-]{43}$/, 'A P-256 coordinate is 32 bytes, written as 43 base64url characters.');

/** The public half of a tablet's ECDSA P-256 key as a JWK; a private member (`d`) is refused, never stored. */
export const publicJwkSchema = z
	.looseObject({
		kty: z.literal('EC', { error: 'The device key must be an elliptic-curve key.' }),
		crv: z.literal('P-256', { error: 'The device key must be on the P-256 curve.' }),
		x: b64url32,
		y: b64url32
	})
	.refine((k) => !('d' in k), 'That is a private key: the private key never leaves the tablet.')
	.transform(({ kty, crv, x, y }) => ({ kty, crv, x, y }));
export type PublicJwk = z.infer<typeof publicJwkSchema>;

/** Enrolling this tablet (page form and `POST /api/devices`). */
export const enrolSchema = z.object({
	label: z
		.string()
		.trim()
		.min(2, 'Name the tablet so people can tell it apart, e.g. “Bench 3 tablet”.')
		.max(80, 'Keep the name under 80 characters.'),
	publicKey: z
		.string()
		.max(2000, 'The public key is too long.')
		.transform((s, ctx) => {
			try {
				return JSON.parse(s) as unknown;
			} catch {
				ctx.addIssue({ code: 'custom', message: 'The tablet did not send a readable public key.' });
				return z.NEVER;
			}
		})
		.pipe(publicJwkSchema)
});
export type EnrolInput = z.input<typeof enrolSchema>;

/** The part of {@link enrolSchema} the person types (the key is made by the page when the form is sent). */
export const enrolLabelSchema = enrolSchema.pick({ label: true }).extend({ publicKey: z.string().default('') });

/** Revoking an enrolled tablet. */
export const revokeSchema = z.object({
	deviceId: z.uuid({ error: 'Choose a tablet.' }),
	reason: z
		.string()
		.trim()
		.min(3, 'Say why, e.g. “lost on the shop floor” or “replaced”.')
		.max(500, 'Keep the reason under 500 characters.')
});
export type RevokeInput = z.infer<typeof revokeSchema>;

/** A quality lead's decision on a held record. */
export const resolveHeldSchema = z.object({
	heldId: z.uuid({ error: 'Choose a held record.' }),
	outcome: z.enum(['dismissed', 'dealt_with'], { error: 'Choose what was decided.' }),
	note: z
		.string()
		.trim()
		.min(3, 'Say what was done, e.g. “re-entered on the new run by the technician”.')
		.max(1000, 'Keep the note under 1000 characters.')
});
export type ResolveHeldInput = z.infer<typeof resolveHeldSchema>;
