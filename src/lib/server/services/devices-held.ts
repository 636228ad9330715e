/** The quality lead's side of the holding queue: listing held records and recording a decision on one. */
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '$lib/accounts/schema';
import type { HoldOutcome, HoldReason, IRun } from '../db/entities';
import * as held from '../repositories/held-records';

/** Who reads the queue and decides about held records. */
export const HELD_ROLES: RoleName[] = ['quality'];

export const HOLD_REASON_TEXT: Record<HoldReason, string> = {
	device_revoked: 'Revoked tablet',
	bad_signature: 'Device signature missing or wrong',
	unknown_device: 'Tablet not enrolled here',
	after_release: 'Arrived after release',
	other: 'Refused on sync'
};

export interface HeldView {
	id: string;
	recordId: string;
	runId: string | null;
	deviceId: string | null;
	signerId: string | null;
	kind: string | null;
	reason: HoldReason;
	reasonText: string;
	message: string;
	heldAt: string;
	submission: unknown;
	resolution: null | { outcome: HoldOutcome; note: string; by: string; at: string };
}

export async function listHeld(em: EntityManager, opts: { open?: boolean; runId?: string } = {}): Promise<HeldView[]> {
	return (await held.list(em, opts)).map(({ held: h, resolution: r }) => ({
		id: h.id,
		recordId: h.recordId,
		runId: (h.run as unknown as IRun | null)?.id ?? null,
		deviceId: h.deviceId ?? null,
		signerId: h.signerId ?? null,
		kind:
			typeof (h.submission as { kind?: unknown })?.kind === 'string' ? (h.submission as { kind: string }).kind : null,
		reason: h.reason,
		reasonText: HOLD_REASON_TEXT[h.reason],
		message: h.message,
		heldAt: h.heldAt.toISOString(),
		submission: h.submission,
		resolution: r ? { outcome: r.outcome, note: r.note, by: r.resolvedByName, at: r.resolvedAt.toISOString() } : null
	}));
}

type Result = { ok: true } | { ok: false; status: 403 | 404 | 409; message: string };

/** Records what the quality lead decided about a held record (once), with an admin-log entry. */
export async function resolveHeld(
	em: EntityManager,
	actor: { id: string; name: string; roles: readonly RoleName[] },
	input: { heldId: string; outcome: HoldOutcome; note: string }
): Promise<Result> {
	if (!actor.roles.some((r) => HELD_ROLES.includes(r)))
		return { ok: false, status: 403, message: 'Only a quality lead decides about held records.' };
	const row = await held.findById(em, input.heldId);
	if (!row) return { ok: false, status: 404, message: 'No such held record.' };
	held.resolve(em, { id: actor.id, name: actor.name }, row, input.outcome, input.note);
	try {
		await em.flush();
	} catch (e) {
		if (e instanceof UniqueConstraintViolationException)
			return { ok: false, status: 409, message: 'Someone already recorded a decision on this held record.' };
		throw e;
	}
	return { ok: true };
}
