import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './run.entity';

/** Why a submission was held instead of being stored or only refused. */
export const HOLD_REASONS = [
	/** Sent from (or signed by) a tablet whose enrolment was revoked. */
	'device_revoked',
	/** An enrolled tablet's record whose signature is missing or does not verify. */
	'bad_signature',
	/** Names a device id the server never enrolled, with a signature. */
	'unknown_device',
	/** Arrived after the run was released (quality issue). */
	'after_release',
	/** Anything else a service decides a quality lead must see. */
	'other'
] as const;
export type HoldReason = (typeof HOLD_REASONS)[number];

/**
 * A submission the server would not store but keeps for the quality lead: exactly as sent, why, for which run and
 * from which device. Append-only (migration `…_held_records_append_only`); what the quality lead decided goes in
 * `held_record_resolution`. `submissionHash` (sha256 of the canonical submission) makes a resend hold nothing twice.
 */
export const HeldRecord = defineEntity({
	name: 'HeldRecord',
	tableName: 'held_record',
	properties: {
		id: p.uuid().primary(),
		recordId: p.string().length(64).index(),
		run: () => p.manyToOne(Run).nullable().index(),
		deviceId: p.string().length(64).nullable(),
		signerId: p.uuid().nullable(),
		submission: p.json<unknown>(),
		submissionHash: p.string().length(64),
		reason: p.enum([...HOLD_REASONS]).$type<HoldReason>(),
		message: p.string().length(1000),
		sentById: p.uuid().nullable(),
		sentByName: p.string().length(120).nullable(),
		heldAt: p.datetime().defaultRaw('now()')
	},
	uniques: [{ properties: ['recordId', 'submissionHash'] }]
});
export type IHeldRecord = InferEntity<typeof HeldRecord>;

export const HOLD_OUTCOMES = ['dismissed', 'dealt_with'] as const;
export type HoldOutcome = (typeof HOLD_OUTCOMES)[number];

/** What a quality lead decided about one held record; at most one per held record, append-only. */
export const HeldRecordResolution = defineEntity({
	name: 'HeldRecordResolution',
	tableName: 'held_record_resolution',
	properties: {
		id: p.uuid().primary(),
		heldRecord: () => p.manyToOne(HeldRecord),
		outcome: p.enum([...HOLD_OUTCOMES]).$type<HoldOutcome>(),
		note: p.string().length(1000),
		resolvedById: p.uuid(),
		resolvedByName: p.string().length(120),
		resolvedAt: p.datetime().defaultRaw('now()')
	},
	uniques: [{ properties: ['heldRecord'] }]
});
export type IHeldRecordResolution = InferEntity<typeof HeldRecordResolution>;
