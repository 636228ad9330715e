import { z } from 'zod';
import { hashSchema, recordDraftSchema } from '../../ledger/schema';
import { ROLES } from '../db/entities/user.entity';

/** `POST /api/runs`: start a run of a published version (pinned by its content hash) on a job. */
export const startRunSchema = z.strictObject({
	jobId: z.uuid({ error: 'Choose a job.' }),
	procedureVersionId: z.uuid({ error: 'Choose a published procedure version.' }),
	contentHash: hashSchema,
	assignedToId: z.uuid({ error: 'Choose the technician who will do the work.' })
});
export type StartRunInput = z.infer<typeof startRunSchema>;

/** Bench PINs are 6–8 digits; anything longer is refused before it reaches the KDF. */
const pinSchema = z.string().max(16);

/** Most records one batch may carry (the offline outbox sends smaller batches). */
export const MAX_BATCH = 200;

/**
 * `POST /api/runs/:id/records`. Each record is checked on its own (so one bad record is named, not the batch);
 * `pins` holds the PIN each signer typed on the tablet for this batch, keyed by signer id — checked, never stored.
 */
export const submitBatchSchema = z.strictObject({
	records: z
		.array(z.unknown())
		.min(1, 'Send at least one record.')
		.max(MAX_BATCH, `Send at most ${MAX_BATCH} records at once.`),
	pins: z.record(z.uuid(), pinSchema).default({})
});
export type SubmitBatch = z.infer<typeof submitBatchSchema>;

/**
 * One submitted record: the ledger draft (`id`, `runId`, `kind`, `body`) plus who signed it. `signedAt` is the
 * device's clock (ms); `deviceId` names the tablet (locks are per person per tablet); `signature` (device signing,
 * offline issue) is accepted and not yet checked.
 */
export const submissionSchema = recordDraftSchema.extend({
	signer: z.strictObject({
		id: z.uuid({ error: 'The signer must be a person id.' }),
		role: z.enum(ROLES, { error: 'The signer role must be technician, lead, quality or admin.' })
	}),
	deviceId: z
		.string()
		.regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/, 'A device id is up to 64 letters, digits, dots, dashes.')
		.optional(),
	signedAt: z.int().min(0).optional(),
	signedOffline: z.boolean().optional(),
	/** A record signed offline: the server-sealed permit the tablet was given (`offline-signing.ts`). */
	offlineGrant: z.string().max(1024).optional(),
	signature: z.object({ deviceId: z.string().max(64), value: z.string().max(2048) }).optional()
});
export type Submission = z.infer<typeof submissionSchema>;

/** Keys of a record body that only the server writes. */
export const SERVER_BODY_KEYS = [
	'signer',
	'device',
	'serverTime',
	'engine',
	'evaluation',
	'toolSnapshots',
	'raisedBy'
] as const;

const CLAIMED = z.enum(['pass', 'fail', 'incomplete']);

/** The body of an `attempt` or `signoff` record: a step's checkpoint entries, what the tablet showed, the tools. */
export const entriesBodySchema = z.looseObject({
	stepIndex: z.int().min(0, 'stepIndex is the 0-based step number.'),
	entries: z
		.array(
			z.strictObject({
				checkpointId: z.string().max(48),
				entry: z.unknown(),
				/** The verdict the tablet showed; the server's own is what is stored. */
				claimed: CLAIMED.optional(),
				/** Torque with a preset wrench: the value it was set to for each pass, in the wrench's unit. */
				setTo: z.array(z.string().max(100)).max(10).optional()
			})
		)
		.max(100)
		.default([]),
	tools: z
		.array(z.uuid({ error: 'A tool is named by its id.' }))
		.max(20)
		.default([])
});
export type EntriesBody = z.infer<typeof entriesBodySchema>;

/** The body of a `finding` a person raises (on a step, or on the run as a whole). */
export const findingBodySchema = z.looseObject({
	stepIndex: z.int().min(0).optional(),
	checkpointId: z.string().max(48).optional(),
	text: z.string().trim().min(1, 'Say what was found.').max(4000)
});

/**
 * The body of a `verification`: a second person (lead or quality, who did not do the step) confirms a signed
 * critical step, naming the sign-off they checked.
 */
export const verificationBodySchema = z.looseObject({
	stepIndex: z.int().min(0, 'stepIndex is the 0-based step number.'),
	signoffId: z.uuid({ error: 'signoffId names the sign-off record being verified.' })
});
export type VerificationBody = z.infer<typeof verificationBodySchema>;
