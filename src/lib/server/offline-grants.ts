/**
 * Sealing and opening offline signing grants (policy: `$lib/signing/offline-grant`). A grant is
 * `base64url(JSON claims).base64url(HMAC-SHA256)`; the key is the app secret with a purpose label, so a grant can
 * never pass for a sign-in ticket or the other way round. The tablet stores it as an opaque string.
 */
import { createHmac, timingSafeEqual } from 'node:crypto';
import { z } from 'zod';
import type { OfflineGrantClaims } from '../signing/offline-grant';

const claimsSchema = z.strictObject({
	userId: z.uuid(),
	deviceId: z.string().min(1).max(64),
	issuedAt: z.int().min(0),
	state: z.string().max(64)
});

const mac = (secret: string, body: string) =>
	createHmac('sha256', secret).update(`offline-grant:${body}`).digest('base64url');

export function sealGrant(secret: string, claims: OfflineGrantClaims): string {
	const body = Buffer.from(JSON.stringify(claimsSchema.parse(claims)), 'utf8').toString('base64url');
	return `${body}.${mac(secret, body)}`;
}

/** The claims of a genuine grant, or undefined for anything forged, altered or malformed. */
export function openGrant(secret: string, grant: string): OfflineGrantClaims | undefined {
	if (grant.length > 1024) return undefined;
	const [body, given, ...rest] = grant.split('.');
	if (!body || !given || rest.length) return undefined;
	const a = Buffer.from(given);
	const b = Buffer.from(mac(secret, body));
	if (a.length !== b.length || !timingSafeEqual(a, b)) return undefined;
	try {
		const parsed = claimsSchema.safeParse(JSON.parse(Buffer.from(body, 'base64url').toString('utf8')));
		return parsed.success ? parsed.data : undefined;
	} catch {
		return undefined;
	}
}
