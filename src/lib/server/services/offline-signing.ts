/**
 * Signing with the network down, on the server's side (policy: `$lib/signing/offline-grant`). A record marked
 * `signedOffline` carries no PIN — the tablet checked it against its verifier — so the server accepts it only with a
 * grant it sealed itself for that signer on that enrolled tablet, and only while the grant holds. Records refused
 * here are held for the quality lead like a revoked tablet's.
 *
 * Grants are handed out when the server has just checked the signer's PIN on an enrolled tablet whose device
 * signature verified: that is the moment the tablet may keep a verifier of the PIN typed.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { grantRefusal, signingState } from '../../signing/offline-grant';
import type { IUser } from '../db/entities';
import { env } from '../env';
import * as held from '../repositories/held-records';
import { openGrant, sealGrant } from '../offline-grants';
import type { DeviceStamp } from './devices-signatures';
import type { Submission } from './runs.schema';

/**
 * What the tablet keeps after an online signature: the sealed grant, its issue time (server clock, ms), and the
 * credential epoch sealed in it (`signingState`: session version — roles, deactivation, password — and PIN change
 * time). The tablet re-derives its slow PIN verifier only when the epoch moved (offline-pin.ts `mayKeepVerifier`).
 */
export interface OfflineGrantAnswer {
	grant: string;
	issuedAt: number;
	epoch: string;
}

const secret = () => env().AUTH_SECRET;

/** A grant for `signer` on the verified tablet of `stamp`, or undefined when the tablet is not an enrolled one. */
export function grantFor(signer: IUser, stamp: DeviceStamp, now: Date): OfflineGrantAnswer | undefined {
	if (stamp.status !== 'verified' || !stamp.deviceId) return undefined;
	const issuedAt = now.getTime();
	const state = signingState(signer);
	return {
		grant: sealGrant(secret(), { userId: signer.id, deviceId: stamp.deviceId, issuedAt, state }),
		issuedAt,
		epoch: state
	};
}

/**
 * Null when an offline record's grant holds; otherwise the refusal (and the record is held). The device signature
 * was verified before this is called (`checkSubmission` refuses an unsigned offline record).
 */
export async function offlineRefusal(
	em: EntityManager,
	s: Submission,
	raw: unknown,
	signer: IUser
): Promise<string | null> {
	const claims = s.offlineGrant ? openGrant(secret(), s.offlineGrant) : undefined;
	const why = !s.offlineGrant
		? 'A record signed offline must carry the offline signing permit the tablet was given.'
		: !claims
			? 'The offline signing permit on this record was not issued by this server.'
			: grantRefusal(claims, { signerId: signer.id, deviceId: s.deviceId ?? '', signedAt: s.signedAt }, signer);
	if (!why) return null;
	await held.hold(em, null, {
		recordId: s.id,
		runId: s.runId,
		deviceId: s.deviceId ?? null,
		signerId: signer.id,
		submission: raw,
		reason: 'other',
		message: why
	});
	return `${why} The record is held for the quality lead.`;
}
