/**
 * This tablet's device key: an ECDSA P-256 key pair made once at enrolment, the private half NON-extractable (no
 * script, not even ours, can read its bytes out), kept as a CryptoKey in IndexedDB through idb-keyval in a database
 * of its own (`benchstamp-device`), apart from the offline store so its migrations never touch the key.
 *
 * Browser-only. `crypto.subtle` exists only in a secure context (HTTPS, or localhost): on plain HTTP over the shop
 * network {@link deviceKeySupported} is false and the tablet cannot be enrolled.
 */
import { createStore, del, get, set, type UseStore } from 'idb-keyval';
import {
	DEVICE_KEY_ALGORITHM,
	DEVICE_SIGN_ALGORITHM,
	fromBase64Url,
	signingBytes,
	toBase64Url,
	type SignableRecord
} from '$lib/signing/device-payload';

/** What the tablet keeps about its enrolment. CryptoKeys are structured-cloned into IndexedDB as keys, not bytes. */
export interface DeviceIdentity {
	deviceId: string;
	label: string;
	keyThumbprint: string;
	enrolledAt: string;
	privateKey: CryptoKey;
	publicKey: CryptoKey;
}

/** A record as the tablet sends it once signed. */
export type SignedRecord<T> = T & { deviceId: string; signature: { deviceId: string; value: string } };

const IDENTITY_KEY = 'identity';
let keyStore: UseStore | undefined;
const db = (): UseStore => (keyStore ??= createStore('benchstamp-device', 'keys'));

/** Whether this page can make and use a device key (secure context, Web Crypto, IndexedDB). */
export function deviceKeySupported(): boolean {
	return (
		typeof window !== 'undefined' && window.isSecureContext && !!globalThis.crypto?.subtle && 'indexedDB' in window
	);
}

/** A new key pair; the private key cannot be exported. */
export function createDeviceKeys(): Promise<CryptoKeyPair> {
	return crypto.subtle.generateKey(DEVICE_KEY_ALGORITHM, false, ['sign', 'verify']);
}

/** The public half as the JWK the server stores (`kty`, `crv`, `x`, `y` only). */
export async function publicJwk(keys: CryptoKeyPair): Promise<{ kty: 'EC'; crv: 'P-256'; x: string; y: string }> {
	const jwk = await crypto.subtle.exportKey('jwk', keys.publicKey);
	return { kty: 'EC', crv: 'P-256', x: jwk.x!, y: jwk.y! };
}

export function saveIdentity(identity: DeviceIdentity): Promise<void> {
	return set(IDENTITY_KEY, identity, db());
}

/** This tablet's enrolment, or undefined when it is not enrolled (or the page cannot reach IndexedDB). */
export async function loadIdentity(): Promise<DeviceIdentity | undefined> {
	if (!deviceKeySupported()) return undefined;
	try {
		return await get<DeviceIdentity>(IDENTITY_KEY, db());
	} catch {
		return undefined;
	}
}

/** Forgets the enrolment on this tablet (after the server revoked it, or to enrol it again). */
export function forgetIdentity(): Promise<void> {
	return del(IDENTITY_KEY, db());
}

/** Signs a record draft + signer/time fields as this tablet (sets `deviceId` to the enrolled id). */
export async function signRecord<T extends Omit<SignableRecord, 'deviceId'>>(
	identity: Pick<DeviceIdentity, 'deviceId' | 'privateKey'>,
	record: T
): Promise<SignedRecord<T>> {
	const withDevice = { ...record, deviceId: identity.deviceId };
	const sig = await crypto.subtle.sign(DEVICE_SIGN_ALGORITHM, identity.privateKey, signingBytes(withDevice));
	return { ...withDevice, signature: { deviceId: identity.deviceId, value: toBase64Url(new Uint8Array(sig)) } };
}

/** Checks a signed record against a public key (the offline runner re-checks what it reads back from its store). */
export async function verifyRecord(
	publicKey: CryptoKey,
	record: SignableRecord & { signature?: { deviceId: string; value: string } }
): Promise<boolean> {
	const sig = record.signature && fromBase64Url(record.signature.value);
	if (!sig || record.signature!.deviceId !== record.deviceId) return false;
	return crypto.subtle.verify(DEVICE_SIGN_ALGORITHM, publicKey, sig, signingBytes(record));
}

/**
 * Signs `record` when this tablet is enrolled; otherwise returns it unchanged (an unsigned record from a browser
 * that is no enrolled tablet, which the server accepts only online, flagged).
 */
export async function signIfEnrolled<T extends Omit<SignableRecord, 'deviceId'> & { deviceId?: string }>(
	record: T
): Promise<T | SignedRecord<T>> {
	const identity = await loadIdentity();
	return identity ? signRecord(identity, record) : record;
}
