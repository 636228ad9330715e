/**
 * What an enrolled tablet signs with its device key, as one pure function shared by the tablet and the server: the
 * RFC 8785 canonical form ($lib/ledger/jcs) of the record draft plus the signer, device and time fields, behind a
 * domain prefix so a device signature can never be replayed as anything else (a ledger hash, a photo hash…).
 *
 * Signature: ECDSA P-256 with SHA-256 over the UTF-8 bytes of {@link signingText}, in Web Crypto's IEEE P1363 form
 * (r ‖ s, 64 bytes), sent base64url without padding as `signature.value`.
 */
import { canonicalize, type JsonValue } from '../ledger/jcs';

/** Domain separation: the first line of every signed text. Raise the number if the payload shape ever changes. */
export const DEVICE_SIGNATURE_PREFIX = 'benchstamp-device-signature/1\n';

/** The fields of a submission a device signature covers; everything the server stores from the tablet. */
export interface SignableRecord {
	id: string;
	runId: string;
	kind: string;
	body: unknown;
	signer: { id: string; role: string };
	deviceId: string;
	/** Device clock (ms) at signing. */
	signedAt?: number;
	signedOffline?: boolean;
}

/** The object that is canonicalised; absent optional fields are written as null/false so both sides agree. */
export function signingPayload(r: SignableRecord): JsonValue {
	return {
		record: { id: r.id, runId: r.runId, kind: r.kind, body: r.body as JsonValue },
		signer: { id: r.signer.id, role: r.signer.role },
		deviceId: r.deviceId,
		signedAt: r.signedAt ?? null,
		signedOffline: r.signedOffline ?? false
	};
}

/** The exact text signed: prefix + canonical JSON. Throws `JcsError` for a body JSON cannot carry. */
export function signingText(r: SignableRecord): string {
	return DEVICE_SIGNATURE_PREFIX + canonicalize(signingPayload(r));
}

/** {@link signingText} as UTF-8 bytes, what `crypto.subtle.sign`/`verify` take. */
export function signingBytes(r: SignableRecord): Uint8Array<ArrayBuffer> {
	return new TextEncoder().encode(signingText(r));
}

/** The Web Crypto algorithm of device keys and signatures. */
export const DEVICE_KEY_ALGORITHM = { name: 'ECDSA', namedCurve: 'P-256' } as const;
export const DEVICE_SIGN_ALGORITHM = { name: 'ECDSA', hash: 'SHA-256' } as const;
/** A P-256 signature in IEEE P1363 form is exactly 64 bytes. */
export const DEVICE_SIGNATURE_BYTES = 64;

/** base64url without padding (RFC 4648 §5). */
export function toBase64Url(bytes: Uint8Array): string {
	let bin = '';
	for (const b of bytes) bin += String.fromCharCode(b);
	return btoa(bin).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
}

/** The bytes of a base64url text, or null when it is not base64url. */
export function fromBase64Url(text: string): Uint8Array<ArrayBuffer> | null {
	if (!/^[A-Za-z0-9_-]*$/.test(text) || text.length % 4 === 1) return null;
	const bin = atob(text.replace(/-/g, '+').replace(/_/g, '/') + '='.repeat((4 - (text.length % 4)) % 4));
	const out = new Uint8Array(bin.length);
	for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
	return out;
}
