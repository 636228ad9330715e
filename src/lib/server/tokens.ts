import { createHash, createHmac, randomBytes, timingSafeEqual } from 'node:crypto';

/** A random URL-safe token for e-mailed links, and the sha256 under which it is stored. */
export function newLinkToken(): { token: string; hash: string } {
	const token = randomBytes(32).toString('base64url');
	return { token, hash: hashLinkToken(token) };
}

export function hashLinkToken(token: string): string {
	return createHash('sha256').update(token).digest('hex');
}

/**
 * A short-lived ticket proving that our own sign-in action already checked the password and the limits.
 * Auth.js's credentials callback accepts only this, so the rate-limited path is the only way in.
 */
export function signTicket(secret: string, userId: string, sessionId: string, now = Date.now()): string {
	const body = `${userId}.${sessionId}.${now + 60_000}`;
	const mac = createHmac('sha256', secret).update(`ticket:${body}`).digest('base64url');
	return `${body}.${mac}`;
}

export function readTicket(
	secret: string,
	ticket: string,
	now = Date.now()
): { userId: string; sessionId: string } | undefined {
	const parts = ticket.split('.');
	if (parts.length !== 4) return undefined;
	const [userId, sessionId, expires, mac] = parts;
	const expected = createHmac('sha256', secret).update(`ticket:${userId}.${sessionId}.${expires}`).digest('base64url');
	const a = Buffer.from(mac);
	const b = Buffer.from(expected);
	if (a.length !== b.length || !timingSafeEqual(a, b)) return undefined;
	if (Number(expires) < now) return undefined;
	return { userId, sessionId };
}
