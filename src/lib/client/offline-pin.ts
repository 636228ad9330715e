/**
 * Checking a signer's PIN on the tablet while the network is down.
 *
 * When the server accepts a PIN on this tablet it answers with an offline grant (see `$lib/signing/offline-grant`);
 * the tablet then keeps, per signer, a PBKDF2-HMAC-SHA256 verifier of the PIN beside that grant — never the PIN.
 * Offline, the typed PIN is checked against the verifier while the grant is under 12 hours old, and the record goes
 * into the outbox carrying the grant; the server decides on sync whether the grant still holds.
 *
 * 600,000 iterations: OWASP Password Storage Cheat Sheet's figure for PBKDF2-HMAC-SHA256 (from memory). A 6-digit
 * PIN has only 10^6 values, so the verifier slows a thief with the tablet in hand (≈ days of tablet CPU for all of
 * them) but cannot stop one; what bounds the harm is the 12-hour window, revocation of the tablet, and the server's
 * check on sync (DEVELOPERS.md, threat model). Web Crypto has no memory-hard KDF, which is why it is not argon2.
 */
import { OFFLINE_GRANT_MS } from '$lib/signing/offline-grant';
import { KEYS, type OfflineStore } from './offline-store';

export const PBKDF2_ITERATIONS = 600_000;

/** What the tablet keeps per signer. */
export interface OfflineSigner {
	userId: string;
	name: string;
	/** Opaque server-sealed grant, sent with every record signed offline. */
	grant: string;
	/** Server time the grant was issued (ms); the tablet's copy, for showing and for the 12-hour check. */
	issuedAt: number;
	/** The grant's credential epoch (PIN / roles / account version), when the server sent it. */
	epoch?: string;
	salt: string;
	iterations: number;
	verifier: string;
}

/** How old (server clock) a kept grant may be for a new online signature to leave it and its verifier as they are. */
export const VERIFIER_REUSE_MS = 60 * 60_000;

/**
 * Whether a new online signature may skip re-deriving the verifier (600,000 PBKDF2 iterations, the cost of every
 * online record otherwise). Safe only when the kept verifier is certainly of the PIN the server just accepted: the
 * server's new grant carries the same credential epoch as the kept grant (no PIN, role or account change since),
 * the kept grant is under an hour old on the server's clock, and the iteration count is the one asked for. The kept
 * grant then stays too: a new grant is never stored beside an old verifier.
 */
export function mayKeepVerifier(
	kept: Pick<OfflineSigner, 'userId' | 'issuedAt' | 'epoch' | 'iterations'> | undefined,
	incoming: { userId: string; issuedAt: number; epoch?: string; iterations: number }
): boolean {
	if (!kept || kept.userId !== incoming.userId) return false;
	if (!kept.epoch || !incoming.epoch || kept.epoch !== incoming.epoch) return false;
	if (kept.iterations !== incoming.iterations) return false;
	const age = incoming.issuedAt - kept.issuedAt;
	return age >= 0 && age < VERIFIER_REUSE_MS;
}

const hex = (b: ArrayBuffer | Uint8Array) =>
	Array.from(new Uint8Array(b), (x) => x.toString(16).padStart(2, '0')).join('');
const unhex = (s: string) => new Uint8Array(s.match(/../g)?.map((h) => parseInt(h, 16)) ?? []);

async function derive(pin: string, salt: Uint8Array, iterations: number): Promise<string> {
	const key = await crypto.subtle.importKey('raw', new TextEncoder().encode(pin), 'PBKDF2', false, ['deriveBits']);
	const bits = await crypto.subtle.deriveBits(
		{ name: 'PBKDF2', hash: 'SHA-256', salt: salt as Uint8Array<ArrayBuffer>, iterations },
		key,
		256
	);
	return hex(bits);
}

/** Constant-time comparison of two hex strings of equal length. */
function same(a: string, b: string): boolean {
	if (a.length !== b.length) return false;
	let diff = 0;
	for (let i = 0; i < a.length; i++) diff |= a.charCodeAt(i) ^ b.charCodeAt(i);
	return diff === 0;
}

/**
 * Keeps a verifier of `pin` after the server accepted it and issued `grant`; answers false when the kept one still
 * holds ({@link mayKeepVerifier}) and nothing was derived or written.
 */
export async function rememberSigner(
	store: OfflineStore,
	signer: { userId: string; name: string },
	pin: string,
	grant: { grant: string; issuedAt: number; epoch?: string },
	iterations = PBKDF2_ITERATIONS
): Promise<boolean> {
	const kept = await store.get<OfflineSigner>(KEYS.signer(signer.userId));
	if (mayKeepVerifier(kept, { userId: signer.userId, issuedAt: grant.issuedAt, epoch: grant.epoch, iterations }))
		return false;
	const salt = crypto.getRandomValues(new Uint8Array(16));
	const verifier = await derive(pin, salt, iterations);
	const value: OfflineSigner = { ...signer, ...grant, salt: hex(salt), iterations, verifier };
	await store.set(KEYS.signer(signer.userId), value);
	return true;
}

export type OfflinePinCheck =
	{ ok: true; grant: string } | { ok: false; reason: 'not_here' | 'expired' | 'wrong'; message: string };

/** Checks a PIN typed offline; `now` is the tablet clock. */
export async function checkOfflinePin(
	store: OfflineStore,
	userId: string,
	pin: string,
	now = Date.now()
): Promise<OfflinePinCheck> {
	const s = await store.get<OfflineSigner>(KEYS.signer(userId));
	if (!s)
		return {
			ok: false,
			reason: 'not_here',
			message: 'This person has not signed on this tablet online yet, so cannot sign while the network is down.'
		};
	if (now > s.issuedAt + OFFLINE_GRANT_MS) {
		await store.delMany([KEYS.signer(userId)]);
		return {
			ok: false,
			reason: 'expired',
			message: `${s.name} last signed online on this tablet more than 12 hours ago: sign once with the network up.`
		};
	}
	const got = await derive(pin, unhex(s.salt), s.iterations);
	if (!same(got, s.verifier)) return { ok: false, reason: 'wrong', message: `Wrong PIN for ${s.name}.` };
	return { ok: true, grant: s.grant };
}

/** Signers who can sign offline on this tablet right now (grant under 12 hours old). */
export async function offlineSigners(store: OfflineStore, now = Date.now()): Promise<OfflineSigner[]> {
	const all = await store.transact('readonly', (tx) => tx.range<OfflineSigner>(['signer']));
	return all.map(([, s]) => s).filter((s) => now <= s.issuedAt + OFFLINE_GRANT_MS);
}

/** Forgets a signer's verifier (the server refused their grant, or they asked). */
export function forgetSigner(store: OfflineStore, userId: string): Promise<void> {
	return store.delMany([KEYS.signer(userId)]);
}
