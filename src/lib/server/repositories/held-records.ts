/**
 * The server-side holding queue: submissions the server refused but keeps for the quality lead (a revoked tablet,
 * a bad device signature, a record arriving after release…). Held rows are append-only; a quality lead's decision
 * is one `held_record_resolution` row. "Open" = held and not yet resolved.
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { canonicalize, type JsonValue } from '../../ledger/jcs';
import { uuidv7 } from '../../ledger/uuid-v7';
import {
	HeldRecord,
	HeldRecordResolution,
	type HoldOutcome,
	type HoldReason,
	type IHeldRecord,
	type IHeldRecordResolution
} from '../db/entities';
import * as adminLog from './admin-log';

export interface HoldInput {
	/** The record id as the tablet sent it (any string up to 64 characters; longer ones are cut). */
	recordId: string;
	/** The run it was sent to; null when the run is unknown. */
	runId: string | null;
	deviceId?: string | null;
	signerId?: string | null;
	/** The submission exactly as sent (parsed JSON). */
	submission: unknown;
	reason: HoldReason;
	/** The sentence the tablet was answered with; the quality lead reads the same one. */
	message: string;
}

export interface HeldBy {
	id: string;
	name: string;
}

/** sha256 of the canonical form (RFC 8785) of what was sent, or of its JSON text when it cannot be canonicalised. */
export function submissionHash(submission: unknown): string {
	let text: string;
	try {
		text = canonicalize(submission as JsonValue);
	} catch {
		text = JSON.stringify(submission) ?? 'null';
	}
	return createHash('sha256').update(text, 'utf8').digest('hex');
}

/**
 * Holds one submission. Written at once (its own INSERT, inside the caller's transaction if there is one), with a
 * `record.held` admin-log entry. Idempotent: the same submission sent again for the same record id holds nothing
 * new and returns `{ held: false, id }` of the earlier row.
 */
export async function hold(
	em: EntityManager,
	sentBy: HeldBy | null,
	input: HoldInput
): Promise<{ held: boolean; id: string }> {
	const hash = submissionHash(input.submission);
	const recordId = input.recordId.slice(0, 64);
	return em.transactional(async (tx) => {
		const id = uuidv7();
		const rows: { id: string }[] = await tx.execute(
			`insert into "held_record" ("id", "record_id", "run_id", "device_id", "signer_id", "submission", "submission_hash", "reason", "message", "sent_by_id", "sent_by_name", "held_at")
			 values (?, ?, ?, ?, ?, ?::jsonb, ?, ?, ?, ?, ?, now())
			 on conflict ("record_id", "submission_hash") do nothing returning "id"`,
			[
				id,
				recordId,
				input.runId,
				input.deviceId?.slice(0, 64) ?? null,
				input.signerId ?? null,
				JSON.stringify(input.submission ?? null),
				hash,
				input.reason,
				input.message.slice(0, 1000),
				sentBy?.id ?? null,
				sentBy?.name.slice(0, 120) ?? null
			]
		);
		if (rows.length === 0) {
			const earlier = await tx.findOneOrFail(HeldRecord, { recordId, submissionHash: hash });
			return { held: false, id: earlier.id };
		}
		adminLog.append(tx, sentBy, {
			action: 'record.held',
			subjectType: 'held_record',
			subjectId: id,
			detail: { recordId, runId: input.runId, deviceId: input.deviceId ?? null, reason: input.reason }
		});
		await tx.flush();
		return { held: true, id };
	});
}

/** How many records are held for a run and not yet resolved (`includeResolved` counts every one). */
export async function countForRun(
	em: EntityManager,
	runId: string,
	opts: { includeResolved?: boolean } = {}
): Promise<number> {
	const rows: { n: string }[] = await em.execute(
		`select count(*) as n from "held_record" h
		 where h."run_id" = ? ${opts.includeResolved ? '' : `and not exists (select 1 from "held_record_resolution" r where r."held_record_id" = h."id")`}`,
		[runId]
	);
	return Number(rows[0]?.n ?? 0);
}

export interface HeldListing {
	held: IHeldRecord;
	resolution: IHeldRecordResolution | null;
}

/** Held records newest first, optionally only the open ones or one run's, with their resolution if any. */
export async function list(
	em: EntityManager,
	opts: { open?: boolean; runId?: string; limit?: number } = {}
): Promise<HeldListing[]> {
	const held = await em.find(HeldRecord, opts.runId ? { run: opts.runId } : {}, {
		orderBy: { heldAt: 'desc', id: 'desc' },
		limit: opts.limit ?? 500
	});
	const resolutions = held.length
		? await em.find(HeldRecordResolution, { heldRecord: { $in: held.map((h) => h.id) } })
		: [];
	const byHeld = new Map(resolutions.map((r) => [(r.heldRecord as unknown as IHeldRecord).id, r]));
	return held
		.map((h) => ({ held: h, resolution: byHeld.get(h.id) ?? null }))
		.filter((x) => !opts.open || x.resolution === null);
}

export function findById(em: EntityManager, id: string): Promise<IHeldRecord | null> {
	return em.findOne(HeldRecord, { id });
}

/**
 * Records the quality lead's decision on a held record, once (a second decision violates the unique key and is
 * refused by the caller's service). Queued in the unit of work with its `record.hold_resolved` admin-log entry.
 */
export function resolve(
	em: EntityManager,
	actor: HeldBy,
	held: IHeldRecord,
	outcome: HoldOutcome,
	note: string
): IHeldRecordResolution {
	const row = em.create(HeldRecordResolution, {
		id: uuidv7(),
		heldRecord: held,
		outcome,
		note,
		resolvedById: actor.id,
		resolvedByName: actor.name
	});
	adminLog.append(em, actor, {
		action: 'record.hold_resolved',
		subjectType: 'held_record',
		subjectId: held.id,
		detail: { outcome, recordId: held.recordId }
	});
	return row;
}
