/**
 * When a record signed with the network down may be accepted: the policy, as pure functions over plain data.
 *
 * A tablet may check a signer's PIN by itself only after the server has checked that PIN on that same enrolled
 * tablet recently. At that moment the server hands the tablet a **grant** — who, which tablet, when (server clock),
 * and a fingerprint of the account's signing state — MAC'd by the server so the tablet cannot make or stretch one.
 * The tablet keeps a slow-KDF verifier of the PIN beside the grant (src/lib/client/offline-pin.ts).
 *
 * On sync the server accepts an offline record only if its grant is genuine, for the signer and the device that
 * signed, not older than {@link OFFLINE_GRANT_MS} at the record's device time, and the account's signing state has
 * not changed since (a PIN change, a role change, a deactivation or a password reset each void every grant).
 * The 12-hour window is the offline issue's requirement: one shift plus margin.
 */

/** How long after the server last checked a signer's PIN on a tablet that tablet may check it alone. */
export const OFFLINE_GRANT_MS = 12 * 60 * 60_000;

/** What a grant asserts. `state` is {@link signingState} of the account when the grant was issued. */
export interface OfflineGrantClaims {
	userId: string;
	deviceId: string;
	/** Server time of issue, ms since the epoch. */
	issuedAt: number;
	state: string;
}

/** The parts of an account that, when they change, void its offline grants. */
export interface SigningAccount {
	active: boolean;
	sessionVersion: number;
	pinChangedAt?: Date | null;
}

/**
 * A short fingerprint of the account's signing state. `sessionVersion` rises with every role change, deactivation
 * and password reset; `pinChangedAt` moves with every PIN change.
 */
export function signingState(a: SigningAccount): string {
	return `v${a.sessionVersion}.p${a.pinChangedAt ? a.pinChangedAt.getTime() : 0}`;
}

/** Why an offline record's grant does not hold, or null when it does. Sentences meant for the tablet and audit. */
export function grantRefusal(
	grant: OfflineGrantClaims,
	record: { signerId: string; deviceId: string; signedAt: number | undefined },
	account: SigningAccount & { name: string }
): string | null {
	if (grant.userId !== record.signerId || grant.deviceId !== record.deviceId)
		return `The offline signing permit on this tablet is not ${account.name}'s for this tablet.`;
	if (!account.active) return `${account.name}'s account is deactivated: records signed offline are not accepted.`;
	if (grant.state !== signingState(account))
		return `${account.name}'s PIN, roles or password changed after this tablet last checked the PIN online: sign again online.`;
	if (record.signedAt === undefined) return 'A record signed offline must carry the tablet time of signing.';
	if (record.signedAt < grant.issuedAt - 5 * 60_000)
		return 'The record claims to be signed before the tablet was allowed to sign offline.';
	if (record.signedAt > grant.issuedAt + OFFLINE_GRANT_MS)
		return `Signed more than 12 hours after ${account.name}'s PIN was last checked online on this tablet.`;
	return null;
}
