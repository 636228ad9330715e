/**
 * The rules of three record kinds the one submit route takes (issue 6, R2): `na_approval` (a step does not apply,
 * with a reason and a lead's approval), `handover` (a run paused at the end of a shift, with a note) and
 * `supersession` (a correction: a new record voiding an earlier one, with a reason). submit.service.ts calls
 * {@link prepareRecord} before the run is locked, {@link chainRefusal} under the run's row lock, and
 * {@link afterAppend} in the same transaction as the append.
 *
 * Rules:
 * - N/A: signed by a person in the `lead` role who is not the person asking; the asker is an active technician or
 *   lead. The step must exist, not be critical, and have no current sign-off or N/A. Critical steps are never N/A:
 *   a critical step is one the shop decided needs a second person's eyes, and an N/A would skip exactly that check —
 *   if a critical step truly does not apply to a unit, the procedure says so with a `when` condition, or a lead
 *   publishes a version without it.
 * - Handover: signed by the person leaving (technician or lead); `toId`, when given, names an active technician or
 *   lead other than them. Only an in-progress run is handed over; the run becomes `paused`, and any later record on
 *   it moves it back to `in_progress`.
 * - Correction: names a sign-off, attempt or N/A approval of this run that is not superseded yet; signed by the
 *   signer of that record, or by a person in the `lead` role. A superseded sign-off no longer counts (nor does its
 *   verification), so the step needs a new sign-off.
 * - A sign-off on a step that is N/A is refused (correct the N/A first).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import type { JsonValue } from '../../ledger/jcs';
import {
	CORRECTABLE_KINDS,
	NA_REASONS,
	stepIndexOf,
	stepState,
	supersededBy,
	type NaReason
} from '../../ledger/step-state';
import type { Procedure } from '../../procedure/model';
import type { ILedgerRecord, IRun, IUser } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as ledger from '../repositories/ledger';
import * as users from '../repositories/users';
import type { Submission } from './runs.schema';

/** Kinds this module checks. */
export const R2_KINDS = ['na_approval', 'handover', 'supersession'] as const;
/** Kinds whose checks read the run's chain under its lock (so the submit service loads it for them). */
export const CHAIN_CHECKED_KINDS: readonly string[] = ['na_approval', 'supersession', 'signoff', 'verification'];
/** Roles a person may ask for an N/A, hand a run over in or receive it. */
const WORKING_ROLES = ['technician', 'lead'];

const reasonCodes = Object.keys(NA_REASONS) as [NaReason, ...NaReason[]];

/** `na_approval` body: the step, the tapped reason (+ words, required for `other`), who asked. */
export const naBodySchema = z
	.looseObject({
		stepIndex: z.int().min(0, 'stepIndex is the 0-based step number.'),
		reason: z.enum(reasonCodes, { error: 'Pick a reason the step does not apply.' }),
		note: z.string().trim().max(500, 'Keep the note under 500 characters.').optional(),
		requestedById: z.uuid({ error: 'requestedById names the person asking.' })
	})
	.refine((b) => b.reason !== 'other' || (b.note ?? '').length > 0, {
		path: ['note'],
		message: 'Say why the step does not apply.'
	});

/** `handover` body: the note for whoever continues, and optionally who that is. */
export const handoverBodySchema = z.looseObject({
	note: z.string().trim().min(1, 'Write a handover note for whoever continues.').max(2000),
	toId: z.uuid({ error: 'toId names the person taking over.' }).optional()
});

/** `supersession` body: the record being corrected and why. */
export const supersessionBodySchema = z.looseObject({
	supersedes: z.uuid({ error: 'supersedes names the record being corrected.' }),
	reason: z.string().trim().min(1, 'Say why the record is corrected.').max(1000)
});

/** Keys of these bodies the server writes (refused when a client sends them). */
export const R2_SERVER_KEYS = ['requestedBy', 'from', 'to', 'superseded'] as const;

type Ok = { ok: true; extra: Record<string, JsonValue> } | { ok: false; reason: string };

const issue = (e: z.ZodError) => {
	const i = e.issues[0];
	return `body.${i.path.map(String).join('.')}: ${i.message}`;
};

/**
 * The checks that need no lock: body shape, the people named, the signer's role, the step. Returns what the server
 * adds to the body (names, so the record reads on its own).
 */
export async function prepareRecord(em: EntityManager, s: Submission, signer: IUser, model: Procedure): Promise<Ok> {
	const reserved = R2_SERVER_KEYS.find((k) => k in (s.body as object));
	if (reserved) return { ok: false, reason: `body.${reserved} is written by the server, not sent.` };
	if (s.kind === 'na_approval') {
		const b = naBodySchema.safeParse(s.body);
		if (!b.success) return { ok: false, reason: issue(b.error) };
		const step = model.steps.find((st) => st.index === b.data.stepIndex);
		if (!step) return { ok: false, reason: `The procedure has no step ${b.data.stepIndex + 1}.` };
		if (step.critical)
			return {
				ok: false,
				reason: `Step ${step.index + 1} is a critical step: it cannot be marked not applicable, only done and verified.`
			};
		if (s.signer.role !== 'lead')
			return {
				ok: false,
				reason: signer.roles.includes('lead')
					? 'A not-applicable approval is signed in the lead role.'
					: `${signer.name} does not hold the lead role, so cannot approve a step as not applicable.`
			};
		const asker = await users.findById(em, b.data.requestedById);
		if (!asker || !asker.active || !asker.roles.some((r) => WORKING_ROLES.includes(r)))
			return { ok: false, reason: 'The person asking is not an active technician or lead.' };
		if (asker.id === signer.id)
			return {
				ok: false,
				reason: `${signer.name} asked for this step to be not applicable, so cannot approve it: another lead approves.`
			};
		return { ok: true, extra: { requestedBy: { id: asker.id, name: asker.name } } };
	}
	if (s.kind === 'handover') {
		const b = handoverBodySchema.safeParse(s.body);
		if (!b.success) return { ok: false, reason: issue(b.error) };
		if (!WORKING_ROLES.includes(s.signer.role))
			return { ok: false, reason: 'A handover is signed by the technician or lead leaving the run.' };
		let to: JsonValue = null;
		if (b.data.toId) {
			const next = await users.findById(em, b.data.toId);
			if (!next || !next.active || !next.roles.some((r) => WORKING_ROLES.includes(r)))
				return { ok: false, reason: 'The person taking over is not an active technician or lead.' };
			if (next.id === signer.id) return { ok: false, reason: 'Hand the run over to someone else than yourself.' };
			to = { id: next.id, name: next.name };
		}
		return { ok: true, extra: { from: { id: signer.id, name: signer.name }, to } };
	}
	const b = supersessionBodySchema.safeParse(s.body);
	if (!b.success) return { ok: false, reason: issue(b.error) };
	const target = await ledger.findById(em, b.data.supersedes);
	if (!target || (target.run as unknown as IRun).id !== s.runId)
		return { ok: false, reason: `This run has no record ${b.data.supersedes} to correct.` };
	return {
		ok: true,
		extra: {
			stepIndex: stepIndexOf(target),
			superseded: { kind: target.kind, seq: target.seq, signerId: target.signerId ?? null }
		}
	};
}

/** The checks that depend on the run's chain, made under its row lock; null when the record may be appended. */
export function chainRefusal(run: IRun, earlier: ILedgerRecord[], s: Submission, signer: IUser): string | null {
	const body = s.body as Record<string, unknown>;
	const state = stepState(earlier);
	const n = Number(body.stepIndex) + 1;
	if (s.kind === 'handover' && run.state !== 'in_progress')
		return run.state === 'paused'
			? 'The run is already handed over: record on it to take it up before handing it over again.'
			: 'Only a run in progress can be handed over.';
	if (s.kind === 'na_approval') {
		if (state.signoffOf.has(Number(body.stepIndex)))
			return `Step ${n} is signed already: correct the sign-off first if the step does not apply.`;
		if (state.notApplicable.has(Number(body.stepIndex))) return `Step ${n} is already marked not applicable.`;
	}
	if (s.kind === 'signoff' && state.notApplicable.has(Number(body.stepIndex)))
		return `Step ${n} is marked not applicable: correct that first to sign it.`;
	if (s.kind === 'verification') {
		// A superseded sign-off or attempt is still work on the step: its author is not a second person.
		const did = earlier.some(
			(r) =>
				(r.kind === 'signoff' || r.kind === 'attempt') &&
				stepIndexOf(r) === Number(body.stepIndex) &&
				r.signerId === signer.id
		);
		if (did)
			return `${signer.name} worked on step ${n}, so cannot verify it: a critical step is verified by a second person.`;
	}
	if (s.kind === 'supersession') {
		const target = earlier.find((r) => r.id === body.supersedes);
		if (!target) return `This run has no record ${String(body.supersedes)} to correct.`;
		if (!(CORRECTABLE_KINDS as readonly string[]).includes(target.kind))
			return `A ${target.kind} record cannot be corrected; only sign-offs, attempts and not-applicable approvals.`;
		if (supersededBy(earlier).has(target.id)) return `Record #${target.seq} is already corrected.`;
		if (target.signerId !== signer.id && s.signer.role !== 'lead')
			return `Only the person who signed record #${target.seq}, or a lead, may correct it.`;
	}
	return null;
}

/**
 * The run's state after a record: a handover pauses it, any other record on a paused run resumes it. Written to
 * the admin log in the same transaction.
 */
export function afterAppend(tx: EntityManager, run: IRun, s: Submission, signer: IUser): void {
	if (s.kind === 'handover' && run.state === 'in_progress') {
		run.state = 'paused';
		const to = (s.body as { toId?: string }).toId ?? null;
		adminLog.append(tx, signer, {
			action: 'run.paused',
			subjectType: 'run',
			subjectId: run.id,
			detail: { handover: s.id, to }
		});
	} else if (s.kind !== 'handover' && run.state === 'paused') {
		run.state = 'in_progress';
		adminLog.append(tx, signer, {
			action: 'run.resumed',
			subjectType: 'run',
			subjectId: run.id,
			detail: { by: s.id, kind: s.kind }
		});
	}
}

/** The latest handover of a run, for the runner's note: who handed over, to whom, and who took it up. */
export interface HandoverView {
	id: string;
	note: string;
	from: { id: string; name: string };
	to: { id: string; name: string } | null;
	at: string;
	/** The first person who recorded after it (the run resumed), or null while the run is paused. */
	takenUpBy: { id: string; name: string } | null;
}

type Named = { id: string; name: string };
interface ViewRecord {
	id: string;
	kind: string;
	body: unknown;
	serverTime: string;
}

export function latestHandover(records: readonly ViewRecord[]): HandoverView | null {
	let i = records.length - 1;
	while (i >= 0 && records[i].kind !== 'handover') i -= 1;
	if (i < 0) return null;
	const h = records[i];
	const b = h.body as { note: string; from: Named; to: Named | null };
	const next = records.slice(i + 1).find((r) => (r.body as { signer?: Named } | null)?.signer);
	const signer = next ? (next.body as { signer: Named }).signer : null;
	return {
		id: h.id,
		note: b.note,
		from: b.from,
		to: b.to ?? null,
		at: h.serverTime,
		takenUpBy: signer ? { id: signer.id, name: signer.name } : null
	};
}
