/**
 * The same step signed on two tablets (offline issue): two technicians (or one technician on two tablets) sign the
 * same step while the tablets cannot see each other's records, and both records reach the server. Nothing is
 * overwritten silently; what happens to the later one is the shop's `CONFLICT_POLICY` (DEVELOPERS.md):
 *
 * - `supersede` (default): the later sign-off is stored and becomes the step's current one; the server writes
 *   `conflictsWith: <earlier record id>` into its hashed body, so the chain itself records the clash. The earlier one
 *   stays in the chain, readable, and no longer counts (`$lib/ledger/step-state` `conflictsOf`); a verification of
 *   it no longer counts either, so a critical step is verified again.
 * - `hold`: the later sign-off is refused and goes to the held-records queue for the quality lead instead of the
 *   chain (held by `held-refusals.ts` from the batch loop, with the submission exactly as sent).
 *
 * A clash is a sign-off for a step whose current sign-off came from another device, or from another signer. The same
 * signer signing again on the same tablet is an ordinary re-sign (the latest counts), as before. "Later" is the order
 * the server receives them in (the chain order): device clocks can be wrong, the run's row lock is not.
 *
 * Verifications and N/A approvals do not clash this way: a second verification of a verified step and an N/A for a
 * signed step (or a sign-off for an N/A step) are refused by their own rules, and when signed offline the refusal is
 * held for the quality lead like every other refused offline record.
 *
 * Hook points in submit.service.ts: `clientConflictRefusal` in `prepare` (the field is the server's), `conflictFor`
 * in `append` under the run's lock with the chain already loaded. The fast path never takes a sign-off.
 */
import type { RecordAnswer } from './submit.service';
import { stepIndexOf, stepState } from '../../ledger/step-state';
import type { ILedgerRecord, IUser } from '../db/entities';
import { conflictPolicySchema } from '../env';
import { markHeld } from './held-refusals';
import type { Submission } from './runs.schema';

export type ConflictPolicy = 'supersede' | 'hold';
/** Kinds that can clash (the rest are refused by their own rules when they repeat). */
export const CONFLICT_KINDS: readonly string[] = ['signoff'];
/** The body member the server writes on the later of two clashing sign-offs. */
export const CONFLICT_KEY = 'conflictsWith';

let override: ConflictPolicy | undefined;
/** Sets the policy for this process (tests); undefined goes back to `CONFLICT_POLICY`. */
export function useConflictPolicy(policy: ConflictPolicy | undefined) {
	override = policy;
}
export const conflictPolicy = (): ConflictPolicy =>
	override ?? conflictPolicySchema.parse(process.env.CONFLICT_POLICY || undefined);

/** A refusal when the client sent the server's own conflict field. */
export function clientConflictRefusal(body: unknown): string | null {
	return body !== null && typeof body === 'object' && CONFLICT_KEY in body
		? `body.${CONFLICT_KEY} is written by the server, not sent.`
		: null;
}

export type ConflictDecision =
	{ kind: 'none' } | { kind: 'supersede'; extra: { conflictsWith: string } } | { kind: 'hold'; reason: string };

type Named = { signer?: { name?: string }; device?: { id?: string | null } };
const tabletWords = (deviceId: string | null | undefined) =>
	deviceId ? `tablet ${deviceId}` : 'a browser that is no enrolled tablet';

/**
 * What to do with `s` given the chain `earlier` (read under the run's lock). For a clash under `supersede`, `extra`
 * goes into the stored body; under `hold` the reason is the refusal the tablet shows. `chosen` overrides the setting.
 */
export function conflictFor(
	earlier: readonly ILedgerRecord[],
	s: Submission,
	signer: IUser,
	chosen?: ConflictPolicy
): ConflictDecision {
	if (!CONFLICT_KINDS.includes(s.kind)) return { kind: 'none' };
	const step = stepIndexOf(s);
	const currentId = stepState(earlier).signoffOf.get(step);
	const current = currentId ? earlier.find((r) => r.id === currentId) : undefined;
	if (!current) return { kind: 'none' };
	if ((current.deviceId ?? '') === (s.deviceId ?? '') && current.signerId === signer.id) return { kind: 'none' };
	// Read only on a clash: seeds and scripts that never clash need no validated environment.
	const policy = chosen ?? conflictPolicy();
	if (policy === 'supersede') return { kind: 'supersede', extra: { conflictsWith: current.id } };
	const b = (current.body ?? {}) as Named;
	return {
		kind: 'hold',
		reason:
			`Signed on two tablets: step ${step + 1} already has sign-off #${current.seq} by ${b.signer?.name ?? 'someone'} ` +
			`on ${tabletWords(current.deviceId)}. This sign-off by ${signer.name} on ${tabletWords(s.deviceId)} is held for ` +
			'the quality lead instead of entering the run.'
	};
}

/** The refusal answer of a held clash, marked so the batch loop holds it with the submission as sent. */
export const heldConflict = (answer: RecordAnswer): RecordAnswer => markHeld(answer, 'other');
