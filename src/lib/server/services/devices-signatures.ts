/**
 * Device signatures on submitted records (hooked into submit.service.ts `prepare`): which records must be signed,
 * verification (node:crypto Web Crypto, ECDSA P-256 / SHA-256 over `$lib/signing/device-payload`), and holding what
 * is refused for the quality lead.
 *
 * Policy (DEVICE_POLICY in DEVELOPERS.md):
 * - a record naming an enrolled tablet (as `deviceId` or in its signature) must carry a signature that verifies
 *   against that tablet's key → stored, stamped `verified`; missing or wrong → refused and held (`bad_signature`);
 * - a revoked tablet's records are refused and held (`device_revoked`), signed or not;
 * - a signature from a tablet id the server never enrolled → refused and held (`unknown_device`);
 * - an unsigned record from a browser that is not an enrolled tablet is accepted only when it was signed online
 *   (a signed-in session sent it just now), stamped `unsigned` so audit shows it; an unsigned record marked
 *   `signedOffline` is refused and held (`bad_signature`).
 * The stamp goes inside the hashed body as `deviceSignature`, overwriting anything the client put there.
 */
import { webcrypto } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import {
	DEVICE_KEY_ALGORITHM,
	DEVICE_SIGN_ALGORITHM,
	DEVICE_SIGNATURE_BYTES,
	fromBase64Url,
	signingBytes
} from '../../signing/device-payload';
import type { HoldReason, IDevice } from '../db/entities';
import * as devices from '../repositories/devices';
import * as held from '../repositories/held-records';
import type { Submission } from './runs.schema';

/** What the server found about a record's device signature, stored in its body. */
export interface DeviceStamp {
	status: 'verified' | 'unsigned';
	deviceId: string | null;
	keyThumbprint?: string;
}

export type DeviceCheck = { ok: true; stamp: DeviceStamp } | { ok: false; reason: string; held: boolean };

const keyCache = new Map<string, Promise<CryptoKey>>();
const stamps = new WeakMap<object, DeviceStamp>();

function publicKeyOf(device: IDevice): Promise<CryptoKey> {
	const cacheKey = `${device.id}:${device.keyThumbprint}`;
	let key = keyCache.get(cacheKey);
	if (!key) {
		if (keyCache.size > 1000) keyCache.clear();
		key = webcrypto.subtle.importKey('jwk', device.publicKey as JsonWebKey, DEVICE_KEY_ALGORITHM, false, ['verify']);
		keyCache.set(cacheKey, key);
	}
	return key;
}

/** True when `value` (base64url, 64 bytes P1363) is the device's signature over the record's signing payload. */
export async function verifyDeviceSignature(device: IDevice, s: Submission, value: string): Promise<boolean> {
	const sig = fromBase64Url(value);
	if (!sig || sig.length !== DEVICE_SIGNATURE_BYTES || !s.deviceId) return false;
	try {
		const data = signingBytes({ ...s, deviceId: s.deviceId });
		return await webcrypto.subtle.verify(DEVICE_SIGN_ALGORITHM, await publicKeyOf(device), sig, data);
	} catch {
		return false;
	}
}

/** Enrolled tablets by id, read once per submitted batch (the submit service's batch cache). */
export type DeviceRows = Map<string, Promise<IDevice | null>>;

/** Holds a refused record for the quality lead (idempotent: a resend holds nothing twice) and answers the refusal. */
async function refuseAndHold(
	em: EntityManager,
	s: Submission,
	raw: unknown,
	runId: string,
	reason: HoldReason,
	message: string
): Promise<DeviceCheck> {
	await held.hold(em, null, {
		recordId: s.id,
		runId,
		deviceId: s.signature?.deviceId ?? s.deviceId ?? null,
		signerId: s.signer.id,
		submission: raw,
		reason,
		message
	});
	return { ok: false, reason: `${message} The record is held for the quality lead.`, held: true };
}

const revokedMessage = (device: IDevice) =>
	`Tablet “${device.label}” was revoked on ${device.revokedAt!.toISOString().slice(0, 10)}: its records are not stored.`;

/**
 * Checks one parsed submission's device and signature; a refusal that must reach the quality lead is held here
 * (idempotent: a resend holds nothing twice). On success the stamp is remembered for {@link deviceStamp}.
 *
 * With `rows` the tablet's row is read once per batch. A revocation that lands later in the batch is still
 * honoured record by record: the append itself checks it under the run's row lock (the fast append's statement
 * stores nothing for a tablet revoked by then; the full path calls {@link revokedRefusal}), see {@link enrolledDeviceOf}.
 */
export async function checkSubmission(
	em: EntityManager,
	s: Submission,
	raw: unknown,
	runId: string,
	rows?: DeviceRows
): Promise<DeviceCheck> {
	const refuse = (reason: HoldReason, message: string) => refuseAndHold(em, s, raw, runId, reason, message);
	const sig = s.signature;
	if (sig && sig.deviceId !== s.deviceId)
		return refuse(
			'bad_signature',
			`The signature names tablet ${sig.deviceId} but the record was sent as tablet ${s.deviceId ?? '(none)'}.`
		);
	const claimed = sig?.deviceId ?? s.deviceId;
	let device: IDevice | null = null;
	if (claimed && rows) {
		let row = rows.get(claimed);
		if (!row) {
			row = devices.findById(em.fork(), claimed);
			rows.set(claimed, row);
		}
		device = await row;
	} else if (claimed) device = await devices.findById(em, claimed);
	if (device?.revokedAt) return refuse('device_revoked', revokedMessage(device));
	let stamp: DeviceStamp;
	if (device) {
		if (!sig)
			return refuse(
				'bad_signature',
				`Tablet “${device.label}” is enrolled, so its records must carry its device signature; this one has none.`
			);
		if (!(await verifyDeviceSignature(device, s, sig.value)))
			return refuse(
				'bad_signature',
				`The device signature does not match this record: it was changed after signing, or signed with another key than tablet “${device.label}”'s.`
			);
		stamp = { status: 'verified', deviceId: device.id, keyThumbprint: device.keyThumbprint };
	} else if (sig) {
		return refuse('unknown_device', `The record is signed by tablet ${sig.deviceId}, which is not enrolled here.`);
	} else if (s.signedOffline) {
		return refuse('bad_signature', 'A record signed offline must carry an enrolled tablet’s device signature.');
	} else {
		stamp = { status: 'unsigned', deviceId: s.deviceId ?? null };
	}
	stamps.set(s, stamp);
	return { ok: true, stamp };
}

/**
 * The enrolled tablet whose signature {@link checkSubmission} verified on `s` (null for an unsigned record): the
 * append must still find it not revoked, under the run's row lock, before it stores the record.
 */
export function enrolledDeviceOf(s: Submission): string | null {
	const stamp = stamps.get(s);
	return stamp?.status === 'verified' ? stamp.deviceId : null;
}

/**
 * Why the tablet `deviceId` no longer signs (it has been revoked by now), or null while it is still enrolled. Read
 * with `tx` inside the record's transaction once it holds the run's row lock. The caller holds the refusal for the
 * quality lead AFTER that transaction (`markHeld`, as a held clash): holding inside it would wait on the run's lock.
 */
export async function revokedRefusal(tx: EntityManager, deviceId: string): Promise<string | null> {
	const device = await devices.findById(tx, deviceId);
	return device?.revokedAt ? revokedMessage(device) : null;
}

/** The `deviceSignature` member to put in the stored body of a submission {@link checkSubmission} passed. */
export function deviceStamp(s: Submission): { deviceSignature: DeviceStamp } {
	return { deviceSignature: stamps.get(s) ?? { status: 'unsigned', deviceId: s.deviceId ?? null } };
}
