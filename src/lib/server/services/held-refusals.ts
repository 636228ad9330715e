/**
 * Refused records the quality lead must see (offline issue): every refusal of a record signed offline
 * (`signedOffline: true`: the tablet's outbox keeps it as refused, and the server keeps it in the held-records queue),
 * every record that arrives after its run was released, and a clash the conflict policy holds (`run-conflicts.ts`).
 * Called once per refused answer from the submit batch loop, with the submission exactly as sent.
 *
 * One held row per record id and run: a resend of a refused record holds nothing new, and a record a service already
 * held (a revoked tablet, a bad device signature, an offline grant that does not hold) is not held twice.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { HeldRecord, type HoldReason } from '../db/entities';
import * as held from '../repositories/held-records';
import { RELEASED_REFUSAL } from './release-guard';
import type { RecordAnswer } from './submit.service';

/** The sentence a held refusal ends with (the tablet shows it beside the reason). */
export const HELD_SENTENCE = 'The record is held for the quality lead.';
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const marks = new WeakMap<RecordAnswer, HoldReason>();

/** Marks a refusal to be held with `reason` whatever the record's offline flag (returns the same answer). */
export function markHeld(answer: RecordAnswer, reason: HoldReason): RecordAnswer {
	marks.set(answer, reason);
	return answer;
}

/** Why `answer` (a refusal of `raw`) is held, or null when it is only refused. */
export function holdReasonOf(raw: unknown, answer: RecordAnswer): HoldReason | null {
	if (answer.status !== 'refused') return null;
	const marked = marks.get(answer);
	if (marked) return marked;
	if (answer.reason?.startsWith(RELEASED_REFUSAL)) return 'after_release';
	return (raw as { signedOffline?: unknown } | null)?.signedOffline === true ? 'other' : null;
}

/**
 * Holds a refused record when it must be held (see the module comment) and ends the refusal with
 * {@link HELD_SENTENCE} (not a released run's, which already says the record is closed). Any other answer comes back
 * unchanged. A record without a usable id cannot be held.
 */
export async function holdRefusal(
	em: EntityManager,
	runId: string,
	raw: unknown,
	answer: RecordAnswer
): Promise<RecordAnswer> {
	const reason = holdReasonOf(raw, answer);
	const r = (raw ?? {}) as { id?: unknown; deviceId?: unknown; signer?: { id?: unknown } };
	if (!reason || typeof r.id !== 'string' || r.id !== answer.id) return answer;
	const said = answer.reason ?? 'Refused.';
	// A released run's refusal already says the record is closed; the others say where the record went.
	const reply =
		reason === 'after_release' || said.includes(HELD_SENTENCE)
			? answer
			: { ...answer, reason: `${said} ${HELD_SENTENCE}` };
	const fork = em.fork({ clear: true });
	if ((await fork.count(HeldRecord, { recordId: r.id.slice(0, 64), run: runId })) > 0) return reply;
	await held.hold(fork, null, {
		recordId: r.id,
		runId,
		deviceId: typeof r.deviceId === 'string' ? r.deviceId : null,
		signerId: typeof r.signer?.id === 'string' && UUID.test(r.signer.id) ? r.signer.id : null,
		submission: raw,
		reason,
		message: said
	});
	return reply;
}
